/** The <option>s of a site picker, "TWT · Tarnholm Water Treatment Works", valued by site id. */
export function SiteOptions({ sites }: { sites: { id: number; code: string; name: string }[] | undefined }) {
  return (
    <>
      {sites?.map((s) => (
        <option key={s.id} value={s.id}>
          {s.code} · {s.name}
        </option>
      ))}
    </>
  );
}
