import { z } from "zod";
import { nameField } from "~/lib/names";

export const NAME_MAX = 60;
export const PASSWORD_MIN = 10;

const name = (what: string) => nameField(what, NAME_MAX);

export const email = z
  .string()
  .trim()
  .min(1, "Enter your e-mail address.")
  .max(254, "That e-mail address is too long.")
  .pipe(z.email("That doesn't look like an e-mail address."));

export const newPassword = z
  .object({
    password: z
      .string()
      .min(PASSWORD_MIN, `Use at least ${PASSWORD_MIN} characters.`)
      .max(200, "Keep the password under 200 characters."),
    confirm: z.string(),
  })
  .refine((v) => v.password === v.confirm, { path: ["confirm"], message: "The two passwords differ." });

export const signUpSchema = z
  .object({ studioName: name("your studio's name"), displayName: name("your name"), email })
  .and(newPassword);
