import { z } from "zod";
import { text } from "./common";
import { ROLES } from "../auth/permissions";
import { passwordShapeProblem } from "../auth/password-rules";

export const emailSchema = text().trim().toLowerCase().email("Enter a valid e-mail address, like name@example.org.");

export const signInSchema = z.object({
  email: emailSchema,
  password: text().min(1, "Enter your password.").max(1000, "A password is at most 200 characters."),
});

export const passwordSchema = text().superRefine((password, ctx) => {
  const problem = passwordShapeProblem(password);
  if (problem) ctx.addIssue({ code: "custom", message: problem });
});

export const inviteUserSchema = z.object({
  email: emailSchema,
  name: text().trim().max(120, "Keep the name under 120 characters.").default(""),
  role: z.enum(ROLES, { message: `Choose a role: ${ROLES.join(", ")}.` }),
});

export const updateUserSchema = z
  .object({
    role: z.enum(ROLES, { message: `Choose a role: ${ROLES.join(", ")}.` }).optional(),
    status: z.enum(["active", "deactivated"], { message: "Status is active or deactivated." }).optional(),
    name: text().trim().max(120).optional(),
    // Partner scope: the sites a viewer may read; null gives back every site (docs/security.md).
    site_ids: z
      .array(z.string().uuid("Each site id is a site's id."), { message: "site_ids is a list of site ids, or null for every site." })
      .max(1000, "Assign at most 1000 sites.")
      .transform((ids) => [...new Set(ids)])
      .nullable()
      .optional(),
  })
  .strict()
  .refine((v) => Object.keys(v).length > 0, "Send at least one of role, status, name, site_ids.");

export type UpdateUserInput = z.infer<typeof updateUserSchema>;

export const acceptInviteSchema = z
  .object({ token: text().min(10), password: passwordSchema, confirm: text() })
  .refine((v) => v.password === v.confirm, { message: "The two passwords differ.", path: ["confirm"] });

export type InviteUserInput = z.infer<typeof inviteUserSchema>;
