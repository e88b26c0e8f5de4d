/** Request bodies and answers of /api/auth, shared by the server (validation) and the client (types). */
import { z } from 'zod';

export const passwordMinLength = 10;

const email = z
  .string({ error: 'Enter an e-mail address.' })
  .trim()
  .toLowerCase()
  .max(320, { error: 'An e-mail address has at most 320 characters.' })
  .pipe(z.email({ error: 'Enter a valid e-mail address.' }));

export const signupRequest = z.object({
  name: z
    .string({ error: 'Enter your name.' })
    .trim()
    .min(1, { error: 'Enter your name.' })
    .max(200, { error: 'A name has at most 200 characters.' }),
  email,
  password: z
    .string({ error: 'Choose a password.' })
    .min(passwordMinLength, { error: `A password has at least ${passwordMinLength} characters.` })
    .max(1024, { error: 'A password has at most 1024 characters.' }),
});
export type SignupRequest = z.infer<typeof signupRequest>;

export const signinRequest = z.object({
  email,
  password: z.string({ error: 'Enter your password.' }).min(1, { error: 'Enter your password.' }).max(1024),
});
export type SigninRequest = z.infer<typeof signinRequest>;

export interface User {
  id: string;
  name: string;
  email: string;
}

export interface SessionResponse {
  user: User | null;
  csrfToken: string;
}
