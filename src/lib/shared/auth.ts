import { z } from 'zod';

/** Body of `POST /api/auth/login`. */
export const LoginSchema = z.object({
  username: z.string().trim().min(1, 'Enter your username.').max(80),
  password: z.string().min(1, 'Enter your password.').max(500),
});
export type Login = z.infer<typeof LoginSchema>;
