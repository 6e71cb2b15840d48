import { useState } from "react";
import { useQueryClient } from "@tanstack/react-query";
import { Section } from "../../components/Page.tsx";
import { Button } from "../../components/Button.tsx";
import { Alert } from "../../components/Alert.tsx";
import { DataTable } from "../../components/DataTable.tsx";
import { rootKeys } from "../../lib/query.ts";
import { errorMessage } from "../../lib/api.ts";
import { formatBytes } from "../../lib/format.ts";
import { importMotors, type ImportResult } from "./api/admin.ts";

export function ImportPanel() {
  const qc = useQueryClient();
  const [file, setFile] = useState<File | null>(null);
  const [progress, setProgress] = useState<number | null>(null);
  const [result, setResult] = useState<ImportResult | null>(null);
  const [error, setError] = useState<string | null>(null);

  const run = async () => {
    if (!file) return;
    setError(null);
    setResult(null);
    setProgress(0);
    try {
      const r = await importMotors(file, setProgress);
      setResult(r);
      await qc.invalidateQueries({ queryKey: rootKeys.assets });
      await qc.invalidateQueries({ queryKey: rootKeys.fleet });
    } catch (err) {
      setError(errorMessage(err));
    } finally {
      setProgress(null);
    }
  };

  return (
    <div className="flex max-w-4xl flex-col gap-4">
      <Section title="Import the motor register">
        <p className="mb-3 text-ink-muted">
          One CSV row per motor: its tag, site and area, and the nameplate (rated kW, V, A, Hz, full-load rpm, poles, rotor bars, …). Rows with a known tag update that motor; a nameplate change starts a new nameplate version.
        </p>
        <div className="flex flex-wrap items-center gap-3">
          <input
            type="file"
            accept=".csv,text/csv"
            aria-label="Motor register CSV"
            className="text-body file:mr-3 file:rounded-md file:border file:border-line-strong file:bg-surface file:px-3 file:py-1 file:font-medium"
            onChange={(e) => {
              setFile(e.target.files?.[0] ?? null);
              setResult(null);
              setError(null);
            }}
          />
          {file && <span className="num text-caption text-ink-muted">{formatBytes(file.size)}</span>}
          <Button variant="primary" disabled={!file || progress !== null} onClick={run}>
            {progress !== null ? `Importing… ${Math.round(progress * 100)} %` : "Import"}
          </Button>
        </div>
      </Section>
      {error && <Alert tone="error" title="The import was rejected">{error}</Alert>}
      {result && (
        <>
          <Alert tone={result.errors.length ? "caution" : "success"} title="Import finished">
            <span className="num">{result.created}</span> created · <span className="num">{result.updated}</span> updated ·{" "}
            <span className="num">{result.errors.length}</span> {result.errors.length === 1 ? "row" : "rows"} with problems
          </Alert>
          {result.errors.length > 0 && (
            <DataTable
              caption="Rows that were not imported"
              columns={[
                { id: "line", header: "Line", numeric: true, cell: (e) => e.line },
                { id: "msg", header: "Problem", cell: (e) => e.message },
              ]}
              rows={result.errors}
              rowKey={(e) => `${e.line}-${e.message}`}
            />
          )}
        </>
      )}
    </div>
  );
}
