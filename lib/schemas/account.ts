// Account-related input, shared by forms (client validation), server actions and the API.
import { z } from "zod";

export const emailSchema = z
  .string({ error: "Enter an e-mail address." })
  .trim()
  .min(1, "Enter an e-mail address.")
  .max(254, "An e-mail address has at most 254 characters.")
  .pipe(z.email("Enter a valid e-mail address, like name@example.org."))
  .transform((email) => email.toLowerCase());

export const newPasswordSchema = z
  .string({ error: "Enter a password." })
  .min(10, "Use at least 10 characters.")
  .max(200, "Use at most 200 characters.");

export const personNameSchema = z
  .string({ error: "Enter your name." })
  .trim()
  .min(1, "Enter your name.")
  .max(120, "Use at most 120 characters.");

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string({ error: "Enter your password." }).min(1, "Enter your password.").max(200, "Use at most 200 characters."),
});
export type SignInInput = z.input<typeof signInSchema>;

export const signInLinkSchema = z.object({ email: emailSchema });
export type SignInLinkInput = z.input<typeof signInLinkSchema>;

export const acceptInvitationSchema = z
  .object({
    token: z.string().min(20).max(200),
    name: personNameSchema,
    password: newPasswordSchema,
    confirmPassword: z.string().max(200),
  })
  .refine((v) => v.password === v.confirmPassword, { path: ["confirmPassword"], message: "The two passwords differ." });
export type AcceptInvitationInput = z.input<typeof acceptInvitationSchema>;

/** Joining with an existing account: the link alone proves control of the address. */
export const joinWithExistingAccountSchema = z.object({ token: z.string().min(20).max(200) });
