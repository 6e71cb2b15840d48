import { z } from "zod";
import { forgotBody, loginBody, setPasswordBody } from "../../shared/schemas/auth.ts";

// The server's own request schemas (src/shared/schemas/auth.ts), so most mistakes are shown before the request.
export const signInSchema = loginBody;

export const forgotSchema = forgotBody;

/** The server's password rule, typed twice; the token comes from the link, not from the form. */
export const setPasswordSchema = setPasswordBody
  .pick({ password: true })
  .extend({ confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

export type SignInInput = z.infer<typeof signInSchema>;
