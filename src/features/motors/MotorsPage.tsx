// The motor register (/motors): server-side paginated, sortable and filterable list of every motor.
import { useEffect, useState } from "react";
import { Link, useNavigate } from "react-router-dom";
import { DataTable, pagedTableProps, useListParams, type Column } from "../../components/DataTable.tsx";
import { Figure } from "../../components/Figure.tsx";
import { Select, TextInput } from "../../components/Form.tsx";
import { GradeBadge } from "../../components/GradeBadge.tsx";
import { Page } from "../../components/Page.tsx";
import { ZoneBadge } from "../../components/ZoneBadge.tsx";
import type { Asset } from "../../lib/contracts.ts";
import { formatDate } from "../../lib/format.ts";
import { GRADES } from "../../lib/grades.ts";
import { useAssets } from "./api/get-assets.ts";
import { useSites } from "../../lib/sites.ts";
import { useSession } from "../../lib/session.ts";
import { DRIVEN_EQUIPMENT } from "../../shared/schemas/assets.ts";
import { AddMotorButton } from "./AddMotor.tsx";

export default function MotorsPage() {
  const list = useListParams({ pageSize: 25, sort: "tag", filters: ["siteId", "areaId", "grade", "drivenEquipment", "q"] });
  const sites = useSites();
  const assets = useAssets(list.query);
  const navigate = useNavigate();
  const { can } = useSession();
  const [text, setText] = useState(list.filters.q);
  useEffect(() => {
    const t = setTimeout(() => text !== list.filters.q && list.setFilter("q", text), 300);
    return () => clearTimeout(t);
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [text]);

  const site = sites.data?.find((s) => String(s.id) === list.filters.siteId);
  const columns: Column<Asset>[] = [
    {
      id: "tag",
      header: "Tag",
      sortKey: "tag",
      cell: (a) => (
        <Link to={`/motors/${a.id}`} className="num whitespace-nowrap font-medium" onClick={(e) => e.stopPropagation()}>
          {a.tag}
        </Link>
      ),
    },
    { id: "name", header: "Motor", sortKey: "name", cell: (a) => a.name },
    { id: "site", header: "Site · area", sortKey: "siteName", cell: (a) => <span className="text-ink-muted">{a.siteName} · {a.areaName}</span>, hideBelow: "md" },
    { id: "equipment", header: "Drives", sortKey: "drivenEquipment", cell: (a) => a.drivenEquipment ?? "—", hideBelow: "lg" },
    { id: "kw", header: "Rated", sortKey: "ratedKw", numeric: true, cell: (a) => <Figure value={a.ratedKw} unit="kW" digits={1} />, hideBelow: "sm" },
    { id: "grade", header: "Rotor grade", sortKey: "rotorGrade", cell: (a) => <GradeBadge grade={a.latest?.rotorGrade} assessable={a.latest ? a.latest.rotorAssessable : undefined} compact /> },
    { id: "sideband", header: "Sideband", sortKey: "sidebandDb", numeric: true, cell: (a) => <Figure value={a.latest?.sidebandDb} unit="dB" digits={1} />, hideBelow: "md" },
    { id: "load", header: "Load", sortKey: "loadPct", numeric: true, cell: (a) => <Figure value={a.latest?.loadPct} unit="%" estimate="slip method" /> },
    { id: "zone", header: "Zone", sortKey: "vibrationZone", cell: (a) => <ZoneBadge zone={a.latest?.vibrationZone} />, hideBelow: "sm" },
    { id: "taken", header: "Last capture", sortKey: "takenAt", cell: (a) => <span className="text-ink-muted">{formatDate(a.latest?.takenAt)}</span>, hideBelow: "lg" },
    {
      id: "findings",
      header: "Open findings",
      sortKey: "openFindings",
      numeric: true,
      cell: (a) => (a.openFindings ? <span className="num font-semibold text-caution">{a.openFindings}</span> : <span className="num text-ink-faint">0</span>),
    },
  ];

  return (
    <Page
      wide
      title="Motors"
      description="The register of every motor Barhound watches. Click a row for the motor's page."
      actions={can("assets.write") ? <AddMotorButton place={{ siteId: list.filters.siteId, areaId: list.filters.areaId }} /> : undefined}
    >
      <DataTable
        caption="Motors"
        {...pagedTableProps(list, assets)}
        columns={columns}
        rowKey={(a) => a.id}
        onRowClick={(a) => navigate(`/motors/${a.id}`)}
        toolbar={
          <>
            <Filter label="Search tag or name">
              <TextInput type="search" value={text} placeholder="e.g. P-101" onChange={(e) => setText(e.target.value)} className="w-48" />
            </Filter>
            <Filter label="Site">
              <Select
                value={list.filters.siteId}
                onChange={(e) => {
                  list.setFilter("siteId", e.target.value);
                  if (list.filters.areaId) list.setFilter("areaId", "");
                }}
              >
                <option value="">All sites</option>
                {sites.data?.map((s) => (
                  <option key={s.id} value={s.id}>
                    {s.name}
                  </option>
                ))}
              </Select>
            </Filter>
            <Filter label="Area">
              <Select value={list.filters.areaId} onChange={(e) => list.setFilter("areaId", e.target.value)} disabled={!site}>
                <option value="">{site ? "All areas" : "Pick a site first"}</option>
                {site?.areas.map((a) => (
                  <option key={a.id} value={a.id}>
                    {a.name}
                  </option>
                ))}
              </Select>
            </Filter>
            <Filter label="Rotor grade">
              <Select value={list.filters.grade} onChange={(e) => list.setFilter("grade", e.target.value)}>
                <option value="">Any grade</option>
                {GRADES.map((g) => (
                  <option key={g.code} value={g.code}>
                    {g.code} {g.name}
                  </option>
                ))}
                <option value="R3,R4,R5">R3 or worse</option>
                <option value="na">Not assessable</option>
                <option value="none">No data</option>
              </Select>
            </Filter>
            <Filter label="Driven equipment">
              <Select value={list.filters.drivenEquipment} onChange={(e) => list.setFilter("drivenEquipment", e.target.value)}>
                <option value="">Any</option>
                {DRIVEN_EQUIPMENT.map((e) => (
                  <option key={e} value={e}>
                    {e}
                  </option>
                ))}
              </Select>
            </Filter>
            {assets.data && (
              <p className="ml-auto self-center text-caption text-ink-muted">
                <span className="num">{assets.data.total}</span> motors
              </p>
            )}
          </>
        }
      />
    </Page>
  );
}

function Filter({ label, children }: { label: string; children: React.ReactNode }) {
  return (
    <label className="flex flex-col gap-1 text-caption font-medium text-ink-muted">
      {label}
      {children}
    </label>
  );
}
