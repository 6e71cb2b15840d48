export function Spinner({ label = "Loading…" }: { label?: string }) {
  return (
    <span role="status" className="inline-flex items-center gap-2 text-ink-muted">
      <span aria-hidden="true" className="size-3.5 animate-spin rounded-full border-2 border-line-strong border-t-brand" />
      {label}
    </span>
  );
}

export function PageLoading() {
  return (
    <div className="flex min-h-[40vh] items-center justify-center">
      <Spinner />
    </div>
  );
}
