import { z } from 'zod';
import { roleSchema } from './roles';

export const loginRequestSchema = z.object({
  email: z
    .string({ error: 'Enter your email address.' })
    .trim()
    .min(1, 'Enter your email address.')
    .max(254, 'That email address is too long.')
    .pipe(z.email({ error: 'Enter a valid email address.' })),
  password: z
    .string({ error: 'Enter your password.' })
    .min(1, 'Enter your password.')
    .max(200, 'That password is too long.'),
});
export type LoginRequest = z.infer<typeof loginRequestSchema>;

export const sessionUserSchema = z.object({
  id: z.string(),
  email: z.string(),
  displayName: z.string(),
  roles: z.array(roleSchema),
});
export type SessionUser = z.infer<typeof sessionUserSchema>;

/** What login and refresh return: a short-lived access token and who it belongs to. */
export interface SessionResponse {
  accessToken: string;
  expiresIn: number;
  user: SessionUser;
}
