// Sign-in, forgotten password and choosing a password (invitation or reset): the request bodies of
// POST /api/auth/login, /auth/forgot and /auth/set-password. The server parses with these; the forms reuse them.
import { z } from "zod";

export const email = z.email("Enter a valid e-mail address.");

/** The password rule, for every place a password is chosen. */
export const passwordRule = z.string({ message: "Choose a password." }).min(10, "Use at least 10 characters.").max(200, "Use at most 200 characters.");

export const loginBody = z.object({ email, password: z.string({ message: "Enter your password." }).min(1, "Enter your password.") });
export type LoginBody = z.output<typeof loginBody>;

export const forgotBody = z.object({ email });

/** The token comes from the link in the mail, not from the person. */
export const setPasswordBody = z.object({ token: z.string({ message: "The link is incomplete." }).min(10, "The link is incomplete."), password: passwordRule });
