import { z } from "zod";

export const MIN_PASSWORD_LENGTH = 10;
export const MAX_PASSWORD_LENGTH = 200;
export const MAX_PERSON_NAME_LENGTH = 100;

export const EmailSchema = z
  .string()
  .trim()
  .toLowerCase()
  .max(254, "E-mail address is too long.")
  .pipe(z.email("Enter a valid e-mail address."));

export const PasswordSchema = z
  .string()
  .min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters.`)
  .max(MAX_PASSWORD_LENGTH, `Use at most ${MAX_PASSWORD_LENGTH} characters.`);

export const PersonNameSchema = z
  .string()
  .trim()
  .min(1, "Enter your name.")
  .max(MAX_PERSON_NAME_LENGTH, `Use at most ${MAX_PERSON_NAME_LENGTH} characters.`);

export const SignUpSchema = z.strictObject({
  name: PersonNameSchema,
  email: EmailSchema,
  password: PasswordSchema,
  /** Token from an invitation link; joins the Study after sign-up. */
  invitationToken: z.string().max(200).optional(),
});
export type SignUp = z.infer<typeof SignUpSchema>;

/** Opening the link e-mailed at sign-up. */
export const SignUpConfirmSchema = z.strictObject({ token: z.string().min(1, "The link has no token.").max(200) });
export type SignUpConfirm = z.infer<typeof SignUpConfirmSchema>;

export const SignInSchema = z.strictObject({
  email: EmailSchema,
  password: z.string().min(1, "Enter your password.").max(MAX_PASSWORD_LENGTH),
});
export type SignIn = z.infer<typeof SignInSchema>;

export const PasswordResetRequestSchema = z.strictObject({ email: EmailSchema });
export type PasswordResetRequest = z.infer<typeof PasswordResetRequestSchema>;

export const PasswordResetConfirmSchema = z.strictObject({
  token: z.string().min(1).max(200),
  password: PasswordSchema,
});
export type PasswordResetConfirm = z.infer<typeof PasswordResetConfirmSchema>;

export const ProfileUpdateSchema = z.strictObject({ name: PersonNameSchema });
export type ProfileUpdate = z.infer<typeof ProfileUpdateSchema>;

export const PasswordChangeSchema = z.strictObject({
  currentPassword: z.string().min(1, "Enter your current password.").max(MAX_PASSWORD_LENGTH),
  newPassword: PasswordSchema,
});
export type PasswordChange = z.infer<typeof PasswordChangeSchema>;

export const UserSchema = z.object({
  id: z.string(),
  name: z.string(),
  email: z.string(),
});
export type User = z.infer<typeof UserSchema>;

export const SessionInfoSchema = z.object({ user: UserSchema.nullable() });
export type SessionInfo = z.infer<typeof SessionInfoSchema>;

export const API_TOKEN_SCOPES = ["read", "read-write"] as const;
/** What a token may do: "read" allows GET requests and the stateless analysis; "read-write" everything its owner's roles allow. */
export const ApiTokenScopeSchema = z.enum(API_TOKEN_SCOPES, { error: "The scope is “read” or “read-write”." });
export type ApiTokenScope = z.infer<typeof ApiTokenScopeSchema>;
/** Longest lifetime a token can be given, in days. */
export const MAX_TOKEN_DAYS = 366;

export const ApiTokenCreateSchema = z.strictObject({
  name: z.string().trim().min(1, "Name the token after the script that uses it.").max(100),
  scope: ApiTokenScopeSchema.default("read"),
  /** Days until the token stops working; null: it never expires (revoke it by hand). */
  expiresInDays: z
    .number({ error: "Give the number of days, or null for no expiry." })
    .int("Whole days only.")
    .min(1, "At least 1 day.")
    .max(MAX_TOKEN_DAYS, `At most ${MAX_TOKEN_DAYS} days.`)
    .nullable()
    .default(90),
});
export type ApiTokenCreate = z.input<typeof ApiTokenCreateSchema>;

export const ApiTokenSchema = z.object({
  id: z.string(),
  name: z.string(),
  scope: ApiTokenScopeSchema,
  createdAt: z.string(),
  lastUsedAt: z.string().nullable(),
  /** null: never expires. */
  expiresAt: z.string().nullable(),
});
export type ApiToken = z.infer<typeof ApiTokenSchema>;
/** Returned once, at creation: the secret is never shown again. */
export const NewApiTokenSchema = ApiTokenSchema.extend({ token: z.string() });
export type NewApiToken = z.infer<typeof NewApiTokenSchema>;
