import { ROTOR_GRADE_NAMES } from "../../src/engine/types.ts";
import { GRADES, ZONES, type FleetHealth, type FleetMotor, type GradeKey } from "./fleet-data.ts";
import { esc, qty } from "./html.ts";

// The printable one-page site report: self-contained HTML (inline CSS, no scripts, no web fonts fetched), laid out
// for A4 portrait. Grades are always written as R-number + name and a tick meter, so the page reads the same
// printed in black and white; the grey ramp only repeats what the text says.

const RAMP: Record<GradeKey, string> = {
  R1: "#eef1f3",
  R2: "#d5dce1",
  R3: "#aab6bf",
  R4: "#6f808c",
  R5: "#34414b",
  notAssessable: "#ffffff",
  noData: "#ffffff",
};

const ticks = (grade: string | null) => {
  const n = grade ? Number(grade.slice(1)) : 0;
  return `<span class="meter" aria-hidden="true">${"▮".repeat(n)}${"▯".repeat(5 - n)}</span>`;
};

const gradeCell = (m: Pick<FleetMotor, "rotorGrade" | "gradeLabel">) =>
  `<span class="grade">${m.rotorGrade ? ticks(m.rotorGrade) + " " : ""}${esc(m.gradeLabel)}</span>`;

const dateOf = (iso: string | null) => (iso ? iso.slice(0, 10) : "–");

export function renderSiteReport(fleet: FleetHealth, opts: { generatedBy?: string } = {}): string {
  const site = fleet.sites[0];
  if (!site) throw new Error("renderSiteReport needs a fleet loaded for one site");
  const maxBin = Math.max(1, ...fleet.load.bins.map((b) => b.count));
  const gradeKeys: GradeKey[] = [...GRADES, "notAssessable", "noData"];
  const gradeName = (k: GradeKey) => (k === "notAssessable" ? "Not assessable" : k === "noData" ? "No data" : `${k} ${ROTOR_GRADE_NAMES[k]}`);
  // Header on two lines ("R3" over "Developing") so eight count columns fit the page width.
  const gradeHead = (k: GradeKey) => (k.startsWith("R") ? `${k}<br>${esc(ROTOR_GRADE_NAMES[k as keyof typeof ROTOR_GRADE_NAMES])}` : k === "notAssessable" ? "Not<br>assessable" : "No<br>data");

  const gradeTable = `
    <table class="counts">
      <thead><tr><th>Area</th><th class="n">Motors</th>${gradeKeys.map((k) => `<th class="n" title="${esc(gradeName(k))}">${gradeHead(k)}</th>`).join("")}</tr></thead>
      <tbody>
        ${site.areas
          .map((a) => `<tr><td>${esc(a.name)}</td><td class="n">${a.motors}</td>${gradeKeys.map((k) => `<td class="n${a.grades[k] && k.startsWith("R") ? " g-" + k : ""}">${a.grades[k]}</td>`).join("")}</tr>`)
          .join("")}
      </tbody>
      <tfoot><tr><th>Site</th><td class="n">${site.motors}</td>${gradeKeys.map((k) => `<td class="n">${site.grades[k]}</td>`).join("")}</tr></tfoot>
    </table>`;

  const zoneTable = `
    <table class="counts zones">
      <thead><tr><th>Area</th>${ZONES.map((z) => `<th class="n">Zone ${z}</th>`).join("")}<th class="n">No vibration<br>data</th></tr></thead>
      <tbody>${site.areas.map((a) => `<tr><td>${esc(a.name)}</td>${ZONES.map((z) => `<td class="n">${a.zones[z]}</td>`).join("")}<td class="n">${a.zones.none}</td></tr>`).join("")}</tbody>
      <tfoot><tr><th>Site</th>${ZONES.map((z) => `<td class="n">${site.zones[z]}</td>`).join("")}<td class="n">${site.zones.none}</td></tr></tfoot>
    </table>`;

  const worst = fleet.worst.slice(0, 6);
  const worstTable = worst.length
    ? `<table>
        <thead><tr><th>Motor</th><th>Area</th><th>Rotor grade</th><th class="n">Sideband</th><th class="n">Load</th><th class="n">Vibration</th><th>Zone</th><th>Measured</th></tr></thead>
        <tbody>${worst
          .map(
            (m) => `<tr><td class="clip"><b>${esc(m.tag)}</b> ${esc(m.name)}</td><td class="clip">${esc(m.areaName)}</td><td>${gradeCell(m)}</td><td class="n">${qty(m.sidebandDb, "dB")}</td><td class="n">${qty(m.loadPct, "%", 0)}</td><td class="n">${qty(m.vibrationRms, "mm/s", 2)}</td><td>${esc(m.vibrationZone ?? "–")}</td><td class="n">${dateOf(m.takenAt)}</td></tr>`,
          )
          .join("")}</tbody>
      </table>
      <p class="note">Sideband: depth of the lower rotor-bar sideband below the supply line; fewer dB is worse.</p>`
    : `<p class="empty">No motor at this site has a rotor grade or a vibration zone of C or D.</p>`;

  const changes = fleet.changes.length
    ? `<ul class="changes">${fleet.changes
        .slice(0, 6)
        .map((c) => `<li><b>${esc(c.tag)}</b> ${esc(c.fromLabel)} → ${esc(c.toLabel)} (${c.direction}) <span class="num">${dateOf(c.at)}</span></li>`)
        .join("")}</ul>${fleet.changes.length > 6 ? `<p class="note">and ${fleet.changes.length - 6} more.</p>` : ""}`
    : `<p class="empty">No rotor grade or vibration zone changed in the last 7 days.</p>`;

  const hist = `
    <table class="hist">
      <tbody>${fleet.load.bins
        .map(
          (b) => `<tr><th class="n">${b.toPct === null ? `≥\u202f${b.fromPct}` : `${b.fromPct}–${b.toPct}`}\u202f%</th><td>${b.count ? `<span class="bar" style="width:${((b.count / maxBin) * 100).toFixed(0)}%"></span>` : ""}</td><td class="n">${b.count}</td></tr>`,
        )
        .join("")}</tbody>
    </table>
    <p class="note">${fleet.load.under.length} under ${fleet.load.underPct}\u202f% of rated load${fleet.load.under.length ? ": " + fleet.load.under.slice(0, 6).map((m) => `${esc(m.tag)} ${qty(m.loadPct, "%", 0)}`).join(", ") : ""}.
      ${fleet.load.over.length} over ${fleet.load.overPct}\u202f%${fleet.load.over.length ? ": " + fleet.load.over.slice(0, 6).map((m) => `${esc(m.tag)} ${qty(m.loadPct, "%", 0)}`).join(", ") : ""}.
      ${fleet.load.withoutLoad ? `${fleet.load.withoutLoad} without a load reading.` : ""}</p>`;

  const overdue = fleet.overdue.items.length
    ? `<table><thead><tr><th>Motor</th><th>Inspection</th><th>Due</th><th class="n">Late</th><th>Assignee</th></tr></thead>
        <tbody>${fleet.overdue.items
          .slice(0, 5)
          .map((o) => `<tr><td><b>${esc(o.assetTag)}</b></td><td class="clip">${esc(o.title)}</td><td class="n">${esc(o.dueDate)}</td><td class="n">${o.daysOverdue}\u202fd</td><td class="clip">${esc(o.assigneeName ?? "unassigned")}</td></tr>`)
          .join("")}</tbody></table>${fleet.overdue.items.length > 5 ? `<p class="note">and ${fleet.overdue.items.length - 5} more.</p>` : ""}`
    : `<p class="empty">No overdue inspections.</p>`;

  return `<!doctype html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>Site report – ${esc(site.name)} (${esc(site.code)}) – ${esc(site.today)}</title>
<style>
  :root { --ink: #1f2a33; --muted: #5d6b75; --rule: #c9d1d7; --accent: #2c6e8f; }
  * { box-sizing: border-box; }
  body { margin: 0; padding: 24px; color: var(--ink); font: 10pt/1.35 "IBM Plex Sans", "Helvetica Neue", Arial, sans-serif; background: #f6f7f8; }
  .page { max-width: 190mm; margin: 0 auto; background: #fff; padding: 12mm; border: 1px solid var(--rule); }
  header { display: flex; justify-content: space-between; align-items: baseline; border-bottom: 2px solid var(--accent); padding-bottom: 4px; margin-bottom: 8px; }
  h1 { font-size: 15pt; margin: 0; }
  h2 { font-size: 9.5pt; margin: 8px 0 3px; color: var(--accent); text-transform: uppercase; letter-spacing: .04em; }
  .meta { color: var(--muted); font-size: 8.5pt; text-align: right; }
  .kpis { display: flex; gap: 8px; margin: 6px 0; }
  .kpi { flex: 1; border: 1px solid var(--rule); padding: 4px 6px; }
  .kpi b { display: block; font: 600 14pt "JetBrains Mono", ui-monospace, monospace; }
  .kpi span { color: var(--muted); font-size: 8pt; }
  table { width: 100%; border-collapse: collapse; font-size: 8pt; }
  th, td { text-align: left; padding: 1px 3px; border-bottom: 1px solid var(--rule); vertical-align: top; }
  .clip { max-width: 46mm; white-space: nowrap; overflow: hidden; text-overflow: ellipsis; }
  thead th { font-weight: 600; color: var(--muted); border-bottom: 1px solid var(--ink); }
  tfoot th, tfoot td { font-weight: 600; border-top: 1px solid var(--ink); }
  .n, .num { text-align: right; font-family: "JetBrains Mono", ui-monospace, monospace; font-variant-numeric: tabular-nums; white-space: nowrap; }
  ${GRADES.map((g) => `.g-${g} { background: ${RAMP[g]};${g >= "R4" ? " color: #fff;" : ""} }`).join("\n  ")}
  .meter { font-family: "JetBrains Mono", ui-monospace, monospace; letter-spacing: -1px; }
  .grade { white-space: nowrap; }
  .cols { display: grid; grid-template-columns: 1fr 1fr; gap: 12px; }
  .hist th { width: 22mm; color: var(--muted); font-weight: 400; }
  .hist th, .hist td { padding: 0 3px; line-height: 1.15; border-bottom: 0; }
  .hist td:last-child { width: 10mm; }
  .bar { display: inline-block; height: 8px; background: var(--accent); min-width: 1px; -webkit-print-color-adjust: exact; print-color-adjust: exact; }
  .note, .empty { color: var(--muted); font-size: 8pt; margin: 3px 0; }
  ul.changes { margin: 0; padding-left: 16px; font-size: 8.5pt; }
  footer { margin-top: 8px; border-top: 1px solid var(--rule); padding-top: 4px; color: var(--muted); font-size: 7.5pt; }
  @page { size: A4 portrait; margin: 12mm; }
  @media print {
    body { background: #fff; padding: 0; font-size: 9pt; }
    .page { border: 0; padding: 0; max-width: none; }
    .g-R1, .g-R2, .g-R3, .g-R4, .g-R5 { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
    table, .kpis, .cols > div { break-inside: avoid; }
  }
</style>
</head>
<body>
<main class="page">
  <header>
    <div><h1>${esc(site.name)} <span class="num">${esc(site.code)}</span></h1><div class="note">Motor condition report</div></div>
    <div class="meta">Site date ${esc(site.today)} (${esc(site.timezone)})<br>Generated ${esc(fleet.generatedAt.slice(0, 16).replace("T", " "))} UTC${opts.generatedBy ? ` by ${esc(opts.generatedBy)}` : ""}</div>
  </header>

  <section class="kpis">
    <div class="kpi"><b>${site.motors}</b><span>motors</span></div>
    <div class="kpi"><b>${site.grades.R4 + site.grades.R5}</b><span>at R4 Serious or R5 Severe</span></div>
    <div class="kpi"><b>${site.zones.C + site.zones.D}</b><span>in vibration zone C or D</span></div>
    <div class="kpi"><b>${fleet.changes.length}</b><span>grade and zone changes, last 7 days</span></div>
    <div class="kpi"><b>${site.overdueInspections}</b><span>overdue inspections</span></div>
  </section>

  <h2>Rotor grade by area</h2>
  ${gradeTable}
  <p class="note">From each motor's latest analysis. Not assessable: the latest capture could not be graded (e.g. light load, too short). No data: no analysed capture yet.</p>

  <h2>Vibration zone by area</h2>
  ${zoneTable}

  <h2>Worst motors</h2>
  ${worstTable}

  <div class="cols">
    <div><h2>Load, % of rated</h2>${hist}</div>
    <div><h2>Changed this week</h2>${changes}<h2>Overdue inspections</h2>${overdue}</div>
  </div>

  <footer>Barhound · rotor grades R1 Sound ≥ 54 dB, R2 Watch 48–54 dB, R3 Developing 42–48 dB, R4 Serious 36–42 dB, R5 Severe &lt; 36 dB (lower sideband below the supply line) · vibration zones A–D after ISO 20816-3.</footer>
</main>
</body>
</html>
`;
}
