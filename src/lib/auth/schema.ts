import { z } from 'zod';
import { ROLES } from './permissions.ts';

export const email = z.string().trim().toLowerCase().pipe(z.email({ message: 'Enter a valid e-mail address.' }));
export const password = z.string().min(10, 'Use at least 10 characters.').max(128, 'At most 128 characters.');

export const signUpInput = z.strictObject({
  name: z.string().trim().min(1, 'Enter your name.').max(120),
  email,
  password,
  companyName: z.string().trim().min(2, 'Enter your company\'s name.').max(120),
});

export const signInInput = z.strictObject({
  email,
  password: z.string().min(1, 'Enter your password.').max(128),
});

export const inviteInput = z.strictObject({
  email,
  role: z.enum(ROLES, { message: 'Choose a role.' }),
});

export const roleInput = z.strictObject({ role: z.enum(ROLES, { message: 'Choose a role.' }) });
export const companyInput = z.strictObject({ name: z.string().trim().min(2, 'Enter the company\'s name.').max(120) });
export const switchInput = z.strictObject({ organizationId: z.string().min(1).max(36) });

export const changePasswordInput = z.strictObject({
  currentPassword: z.string().min(1, 'Enter your current password.').max(128),
  newPassword: password,
}).refine((v) => v.currentPassword !== v.newPassword, { message: 'Choose a password you have not used here.', path: ['newPassword'] });
