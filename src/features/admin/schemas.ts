import { z } from "zod";
import { ROLES } from "../../lib/contracts.ts";

export const inviteSchema = z.object({
  email: z.email("Enter a valid e-mail address."),
  name: z.string().trim().min(1, "Enter a name.").max(200, "Keep the name under 200 characters."),
  role: z.enum(ROLES, { message: "Pick a role." }),
});

export const siteSchema = z.object({
  code: z.string().trim().min(1, "Enter a short code.").max(20, "Keep the code under 20 characters.").regex(/^[A-Za-z0-9_-]+$/, "Letters, digits, - and _ only."),
  name: z.string().trim().min(1, "Enter the site's name.").max(200),
  timezone: z.string().trim().min(1, "Enter a time zone, e.g. Europe/Berlin."),
});

export const areaSchema = z.object({ name: z.string().trim().min(1, "Enter the area's name.").max(200) });

export const gatewaySchema = z.object({
  name: z.string().trim().min(1, "Name the gateway.").max(200),
  siteId: z.preprocess((v) => (v === "" ? undefined : Number(v)), z.number({ message: "Pick a site." }).int().positive("Pick a site.")),
});
