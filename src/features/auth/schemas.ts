import { z } from "zod";

// The same rules as the server (server/routes/auth.ts), so most mistakes are shown before the request.
export const signInSchema = z.object({
  email: z.email("Enter a valid e-mail address."),
  password: z.string().min(1, "Enter your password."),
});

export const forgotSchema = z.object({ email: z.email("Enter a valid e-mail address.") });

export const passwordRule = z.string().min(10, "Use at least 10 characters.").max(200, "Use at most 200 characters.");

export const setPasswordSchema = z
  .object({ password: passwordRule, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

export type SignInInput = z.infer<typeof signInSchema>;
