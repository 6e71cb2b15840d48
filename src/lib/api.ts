// The one HTTP client of the app. Every request goes to /api with the session cookie; a non-2xx answer becomes an
// ApiError carrying the server's message and, for 400s, its field messages (docs/api.md: `{ error, code?, fields? }`).

export class ApiError extends Error {
  readonly status: number;
  readonly code?: string;
  /** Field path → message (400 answers). */
  readonly fields?: Record<string, string>;
  constructor(status: number, message: string, opts: { code?: string; fields?: Record<string, string> } = {}) {
    super(message);
    this.name = "ApiError";
    this.status = status;
    this.code = opts.code;
    this.fields = opts.fields;
  }
}

export const isApiError = (e: unknown): e is ApiError => e instanceof ApiError;

/** A paginated list answer. */
export interface Paged<T> {
  items: T[];
  total: number;
  page: number;
  pageSize: number;
}

export type QueryValue = string | number | boolean | null | undefined;
export type QueryParams = Record<string, QueryValue | QueryValue[]>;

/** `/captures` + `{ page: 2, q: "" }` → `/api/captures?page=2` (empty values are left out). */
export function apiUrl(path: string, query?: QueryParams): string {
  const base = path.startsWith("/api/") || path === "/api" ? path : `/api${path.startsWith("/") ? "" : "/"}${path}`;
  const qs = toQueryString(query);
  return qs ? `${base}?${qs}` : base;
}

export function toQueryString(query?: QueryParams): string {
  if (!query) return "";
  const sp = new URLSearchParams();
  for (const [k, v] of Object.entries(query)) {
    const values = Array.isArray(v) ? v : [v];
    for (const item of values) {
      if (item === undefined || item === null || item === "" || item === false) continue;
      sp.append(k, item === true ? "1" : String(item));
    }
  }
  return sp.toString();
}

// 401 handling is registered by the app (it owns navigation), so this module stays free of side effects.
let unauthorizedHandler: ((path: string) => void) | null = null;
export function setUnauthorizedHandler(fn: ((path: string) => void) | null) {
  unauthorizedHandler = fn;
}
/** Requests whose 401 is an answer, not a lost session. */
const QUIET_401 = ["/api/me", "/api/auth/login", "/api/auth/logout"];

/** Turn a failed response's body into an ApiError. Accepts the server's JSON shape or anything else. */
export function errorFromBody(status: number, body: unknown, statusText = ""): ApiError {
  if (body && typeof body === "object") {
    const b = body as { error?: unknown; message?: unknown; code?: unknown; fields?: unknown };
    const message = typeof b.error === "string" ? b.error : typeof b.message === "string" ? b.message : defaultMessage(status, statusText);
    const fields =
      b.fields && typeof b.fields === "object"
        ? Object.fromEntries(Object.entries(b.fields as Record<string, unknown>).map(([k, v]) => [k, String(v)]))
        : undefined;
    return new ApiError(status, message, { code: typeof b.code === "string" ? b.code : undefined, fields });
  }
  if (typeof body === "string" && body.trim() && body.length < 300 && !body.trimStart().startsWith("<")) return new ApiError(status, body.trim());
  return new ApiError(status, defaultMessage(status, statusText));
}

export function defaultMessage(status: number, statusText = ""): string {
  switch (status) {
    case 0:
      return "The server could not be reached. Check the connection and try again.";
    case 401:
      return "Your session has ended. Sign in again.";
    case 403:
      return "Your role may not do this.";
    case 404:
      return "Not found.";
    case 409:
      return "This conflicts with the current state. Reload and try again.";
    case 413:
      return "The file is larger than the server accepts.";
    case 415:
      return "This file type is not accepted.";
    case 422:
      return "The file could not be read.";
    default:
      return status >= 500 ? "Something went wrong on the server." : statusText || `Request failed (${status}).`;
  }
}

export interface RequestOptions {
  method?: "GET" | "POST" | "PATCH" | "PUT" | "DELETE";
  query?: QueryParams;
  /** A plain object is sent as JSON; FormData as multipart. */
  body?: unknown;
  signal?: AbortSignal;
}

export async function api<T = unknown>(path: string, opts: RequestOptions = {}): Promise<T> {
  const url = apiUrl(path, opts.query);
  const isForm = typeof FormData !== "undefined" && opts.body instanceof FormData;
  const headers: Record<string, string> = { Accept: "application/json" };
  if (opts.body !== undefined && !isForm) headers["Content-Type"] = "application/json";
  let res: Response;
  try {
    res = await fetch(url, {
      method: opts.method ?? (opts.body !== undefined ? "POST" : "GET"),
      credentials: "include",
      headers,
      body: opts.body === undefined ? undefined : isForm ? (opts.body as FormData) : JSON.stringify(opts.body),
      signal: opts.signal,
    });
  } catch (err) {
    if ((err as Error)?.name === "AbortError") throw err;
    throw new ApiError(0, defaultMessage(0));
  }
  const body = await readBody(res);
  if (!res.ok) {
    const error = errorFromBody(res.status, body, res.statusText);
    if (res.status === 401 && !QUIET_401.some((p) => url.startsWith(p))) unauthorizedHandler?.(url);
    throw error;
  }
  return body as T;
}

async function readBody(res: Response): Promise<unknown> {
  if (res.status === 204) return undefined;
  const type = res.headers.get("content-type") ?? "";
  if (type.includes("json")) return res.json().catch(() => undefined);
  return res.text().catch(() => undefined);
}

export const apiGet = <T>(path: string, query?: QueryParams, signal?: AbortSignal) => api<T>(path, { query, signal });
export const apiPost = <T>(path: string, body?: unknown) => api<T>(path, { method: "POST", body: body ?? {} });
export const apiPatch = <T>(path: string, body: unknown) => api<T>(path, { method: "PATCH", body });
export const apiDelete = <T = void>(path: string) => api<T>(path, { method: "DELETE" });

export interface UploadOptions {
  onProgress?: (loaded: number, total: number) => void;
  signal?: AbortSignal;
  method?: "POST" | "PUT";
}

/**
 * Multipart upload through XMLHttpRequest, because fetch reports no upload progress.
 * Resolves with the parsed JSON answer; rejects with an ApiError like `api()`.
 */
export function apiUpload<T = unknown>(path: string, form: FormData, opts: UploadOptions = {}): Promise<T> {
  const url = apiUrl(path);
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open(opts.method ?? "POST", url);
    xhr.withCredentials = true;
    xhr.setRequestHeader("Accept", "application/json");
    xhr.upload.onprogress = (e) => opts.onProgress?.(e.loaded, e.lengthComputable ? e.total : 0);
    xhr.onload = () => {
      let body: unknown = xhr.responseText;
      if ((xhr.getResponseHeader("content-type") ?? "").includes("json")) {
        try {
          body = JSON.parse(xhr.responseText);
        } catch {
          /* keep the text */
        }
      }
      if (xhr.status >= 200 && xhr.status < 300) return resolve(body as T);
      if (xhr.status === 401) unauthorizedHandler?.(url);
      reject(errorFromBody(xhr.status, body, xhr.statusText));
    };
    xhr.onerror = () => reject(new ApiError(0, defaultMessage(0)));
    xhr.onabort = () => reject(new DOMException("Upload cancelled", "AbortError"));
    opts.signal?.addEventListener("abort", () => xhr.abort(), { once: true });
    xhr.send(form);
  });
}

/** The message to show for any thrown value. */
export function errorMessage(err: unknown): string {
  if (err instanceof ApiError) return err.message;
  if (err instanceof Error) return err.message;
  return "Something went wrong.";
}
