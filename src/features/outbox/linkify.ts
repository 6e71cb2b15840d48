// Split mail text into text and link parts. Links to this app (same origin, or the app's paths on a loopback host,
// as the development server writes them) become in-app paths, so they work whatever port the server runs on.

export type Part = { kind: "text"; text: string } | { kind: "link"; text: string; href: string; internal: boolean };

const URL_RE = /https?:\/\/[^\s<>"')\]]+/g;
const APP_PATHS = ["/set-password", "/sign-in", "/forgot-password", "/motors", "/captures", "/review", "/plan", "/my-work", "/fleet", "/upload", "/admin", "/outbox"];

export function linkify(text: string, origin?: string): Part[] {
  const parts: Part[] = [];
  let last = 0;
  for (const m of text.matchAll(URL_RE)) {
    let url = m[0];
    // Sentence punctuation after a link is not part of it.
    const trail = /[.,;:!?]+$/.exec(url);
    if (trail) url = url.slice(0, -trail[0].length);
    const start = m.index!;
    if (start > last) parts.push({ kind: "text", text: text.slice(last, start) });
    parts.push(toLink(url, origin));
    last = start + url.length;
  }
  if (last < text.length) parts.push({ kind: "text", text: text.slice(last) });
  return parts;
}

function toLink(url: string, origin?: string): Part {
  try {
    const u = new URL(url);
    const loopback = u.hostname === "localhost" || u.hostname === "127.0.0.1";
    const ours = (origin && u.origin === origin) || (loopback && APP_PATHS.some((p) => u.pathname === p || u.pathname.startsWith(`${p}/`)));
    if (ours) return { kind: "link", text: url, href: u.pathname + u.search + u.hash, internal: true };
  } catch {
    /* not a URL after all */
  }
  return { kind: "link", text: url, href: url, internal: false };
}
