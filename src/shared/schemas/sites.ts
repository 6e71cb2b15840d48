// Sites and areas (admin): the request bodies of POST/PATCH /api/sites and POST /api/sites/:id/areas, PATCH /api/areas/:id
// (DELETE /api/sites/:id and /api/areas/:id take no body). A field they do not know is refused (.strict(): a 400 that
// names it), so a misspelt field is not silently dropped.
import { z } from "zod";

/** An IANA time zone name the runtime knows (Intl is in every browser and in Node). */
export function isTimeZone(tz: string): boolean {
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return true;
  } catch {
    return false;
  }
}

const siteFields = {
  code: z
    .string({ message: "Give the site a short code." })
    .trim()
    .min(1, "Give the site a short code.")
    .max(20, "Keep the code under 20 characters.")
    .regex(/^[A-Za-z0-9_-]+$/, "Letters, digits, - and _ only."),
  name: z.string({ message: "Give the site a name." }).trim().min(1, "Give the site a name.").max(200, "Keep the name under 200 characters."),
  timezone: z
    .string({ message: "Enter a time zone, e.g. Europe/Berlin." })
    .trim()
    .min(1, "Enter a time zone, e.g. Europe/Berlin.")
    .max(60, "Not a known time zone (use an IANA name such as Europe/Berlin).")
    .refine((tz) => tz === "" || isTimeZone(tz), "Not a known time zone (use an IANA name such as Europe/Berlin)."),
};

export const siteBody = z.object({ ...siteFields, timezone: siteFields.timezone.default("UTC") }).strict();
export type SiteBody = z.output<typeof siteBody>;

/** Editing: any of the fields, none required; an omitted field stays as it is (no default here, or an edit of the
 * name alone would reset the time zone to UTC). */
export const sitePatchBody = z.object(siteFields).partial().strict();

export const areaBody = z.object({ name: z.string({ message: "Give the area a name." }).trim().min(1, "Give the area a name.").max(200, "Keep the name under 200 characters.") }).strict();
