// Admin → Import: the motor register as CSV, one row per motor. Lists the columns the importer reads (required and
// optional, units, the example motor) and offers them as a template file (./register-template.ts).
import { useEffect, useState } from "react";
import { useQueryClient } from "@tanstack/react-query";
import { Section } from "../../components/Page.tsx";
import { Button, buttonClass } from "../../components/Button.tsx";
import { Alert } from "../../components/Alert.tsx";
import { DataTable } from "../../components/DataTable.tsx";
import { rootKeys } from "../../lib/query.ts";
import { errorMessage } from "../../lib/api.ts";
import { formatBytes } from "../../lib/format.ts";
import { importMotors, type ImportResult } from "./api/admin.ts";
import { REGISTER_COLUMNS, registerTemplateCsv, type RegisterColumn } from "./register-template.ts";

export const TEMPLATE_FILE_NAME = "motor-register-template.csv";

/** An object URL of the template CSV for a download link, revoked when the panel goes. */
function useTemplateUrl(): string | undefined {
  const [url, setUrl] = useState<string>();
  useEffect(() => {
    const u = URL.createObjectURL(new Blob([registerTemplateCsv()], { type: "text/csv;charset=utf-8" }));
    setUrl(u);
    return () => URL.revokeObjectURL(u);
  }, []);
  return url;
}

const REQUIRED_WORDS: Record<string, string> = { always: "required", new: "for a new motor" };
const exampleText = (v: RegisterColumn["example"]) => (typeof v === "boolean" ? (v ? "yes" : "no") : String(v));

export function ImportPanel() {
  const qc = useQueryClient();
  const [file, setFile] = useState<File | null>(null);
  const [progress, setProgress] = useState<number | null>(null);
  const [result, setResult] = useState<ImportResult | null>(null);
  const [error, setError] = useState<string | null>(null);
  const templateUrl = useTemplateUrl();

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
          The columns are listed below; comma or semicolon separated, header case and spaces ignored.
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
      <Section
        title="Columns"
        actions={
          <a className={buttonClass("secondary", "sm")} href={templateUrl} download={TEMPLATE_FILE_NAME} aria-disabled={!templateUrl}>
            Download a template
          </a>
        }
      >
        <p className="mb-3 text-caption text-ink-muted">
          <span className="font-semibold text-ink">Tag</span>, <span className="font-semibold text-ink">Site</span> and <span className="font-semibold text-ink">Area</span> are needed on every row;
          a row that adds a motor also needs the full-load speed and the poles. Leave a cell empty to keep what is stored (or take the default on a new motor).
          The template holds the header row; the example motor below is invented.
        </p>
        <div className="overflow-x-auto">
          <table className="w-full text-body" aria-label="Columns of the register import">
            <thead>
              <tr className="border-b border-line text-caption text-ink-muted">
                <th className="py-1 pr-3 text-left font-medium">Column</th>
                <th className="px-2 py-1 text-left font-medium">Required</th>
                <th className="px-2 py-1 text-left font-medium">Unit</th>
                <th className="px-2 py-1 text-left font-medium">What it holds</th>
                <th className="py-1 pl-2 text-left font-medium">Example</th>
              </tr>
            </thead>
            <tbody>
              {REGISTER_COLUMNS.map((c) => (
                <tr key={c.field} className="border-b border-line last:border-b-0" data-column={c.field}>
                  <td className="num whitespace-nowrap py-1 pr-3 font-medium">{c.header}</td>
                  <td className={`whitespace-nowrap px-2 py-1 text-caption ${c.required ? "font-semibold" : "text-ink-muted"}`}>{c.required ? REQUIRED_WORDS[c.required] : "optional"}</td>
                  <td className="num whitespace-nowrap px-2 py-1 text-caption">{c.unit ?? ""}</td>
                  <td className="px-2 py-1 text-caption text-ink-muted">{c.note}</td>
                  <td className={`whitespace-nowrap py-1 pl-2 ${typeof c.example === "number" ? "num text-right" : ""}`}>{exampleText(c.example)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <h3 className="mb-1 mt-4 text-caption font-semibold text-ink-muted">The example as CSV</h3>
        <pre className="num overflow-x-auto rounded-sm bg-sunken p-2 text-caption" data-testid="register-example">{registerTemplateCsv({ example: true })}</pre>
      </Section>
    </div>
  );
}
