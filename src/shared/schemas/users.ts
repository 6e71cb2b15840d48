// Users (admin): the request bodies of POST /api/users (invite) and PATCH /api/users/:id.
import { z } from "zod";
import { ROLES } from "../../../server/permissions.ts"; // a pure list, no server code comes with it

export const userName = z.string({ message: "Enter a name." }).trim().min(1, "Enter a name.").max(200, "Keep the name under 200 characters.");
export const role = z.enum(ROLES, { message: `Pick a role: ${ROLES.join(", ")}.` });

export const inviteBody = z.object({
  email: z.email("Enter a valid e-mail address."),
  name: userName,
  role,
});
export type InviteBody = z.output<typeof inviteBody>;

/** A field it does not know is refused (a 400 that names it), not dropped. */
export const userPatchBody = z
  .object({ role: role.optional(), active: z.boolean({ message: "Active is true or false." }).optional(), name: userName.optional() })
  .strict()
  .refine((b) => Object.keys(b).length > 0, "Nothing to change.");
