import { z } from "zod";

export const signInSchema = z.object({
  email: z.string().trim().min(1, "Enter your e-mail address").max(254).email("That is not an e-mail address"),
  password: z.string().min(1, "Enter your password").max(200),
});

export type SignInInput = z.infer<typeof signInSchema>;
