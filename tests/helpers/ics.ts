// An independent reading of RFC 5545 for the tests (not the server's code), so the checks hold the server to the RFC.

/** §3.1: unfold (CRLF + one space or tab), then split into content lines. */
export function contentLines(ics: string): string[] {
  return ics.replace(/\r\n[ \t]/g, "").split("\r\n").filter(Boolean);
}

/** VEVENTs as maps "NAME" → value and "NAME;PARAMS" → value. */
export function vevents(ics: string): Record<string, string>[] {
  const out: Record<string, string>[] = [];
  let cur: Record<string, string> | null = null;
  for (const line of contentLines(ics)) {
    if (line === "BEGIN:VEVENT") cur = {};
    else if (line === "END:VEVENT") (out.push(cur!), (cur = null));
    else if (cur) {
      const m = /^([A-Z-]+)((?:;(?:[^":]|"[^"]*")*)?):(.*)$/.exec(line)!;
      cur[m[1]] = m[3];
      if (m[2]) cur[m[1] + m[2]] = m[3];
    }
  }
  return out;
}

/** §3.3.11 TEXT unescaping. */
export const unescapeText = (v: string) => v.replace(/\\([\\;,nN])/g, (_m, c: string) => (c === "n" || c === "N" ? "\n" : c));
