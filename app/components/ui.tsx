// Shared building blocks. Every state carries a word or an icon as well as a colour.
import type { ButtonHTMLAttributes, InputHTMLAttributes, ReactNode, SelectHTMLAttributes } from "react";
import { Form } from "react-router";
import { Icon, type IconName } from "./Icon";

type Tone = "ink" | "brass" | "teal" | "brick" | "ghost";

const buttonTones: Record<Tone, string> = {
  ink: "bg-ink text-paper hover:bg-ink/90",
  brass: "bg-brass text-rosewood hover:brightness-105",
  teal: "bg-teal text-white hover:brightness-105",
  brick: "bg-brick text-white hover:brightness-105",
  ghost: "border-2 border-ink/20 text-ink hover:bg-ink/5",
};

export function buttonClass(tone: Tone = "ink", extra = "") {
  return `inline-flex min-h-11 items-center justify-center gap-2 rounded-2xl px-5 py-2 font-display text-lg font-medium transition disabled:cursor-not-allowed disabled:opacity-50 ${buttonTones[tone]} ${extra}`;
}

export function Button({ tone = "ink", className = "", ...props }: ButtonHTMLAttributes<HTMLButtonElement> & { tone?: Tone }) {
  return <button className={buttonClass(tone, className)} {...props} />;
}

/** A form that is one button: its hidden fields say what to do to which row. A plain post, so it works without JavaScript. */
export function PostButton({ fields, tone = "ghost", disabled, children }: { fields: Record<string, string>; tone?: Tone; disabled?: boolean; children: ReactNode }) {
  return (
    <Form method="post">
      {Object.entries(fields).map(([name, value]) => (
        <input key={name} type="hidden" name={name} value={value} />
      ))}
      <Button type="submit" tone={tone} disabled={disabled}>
        {children}
      </Button>
    </Form>
  );
}

export function Card({ children, className = "" }: { children: ReactNode; className?: string }) {
  return <section className={`rounded-3xl border border-ink/10 bg-white/70 p-5 shadow-sm ${className}`}>{children}</section>;
}

interface FieldFrameProps {
  label: string;
  id: string;
  error?: string;
  hint?: string;
}

/** Screen-reader wiring shared by every labelled control: which messages describe it, and whether it is invalid. */
function fieldAria({ id, error, hint }: Omit<FieldFrameProps, "label">) {
  const describedBy = [error ? `${id}-error` : null, hint ? `${id}-hint` : null].filter(Boolean).join(" ");
  return { id, "aria-invalid": error ? true : undefined, "aria-describedby": describedBy || undefined } as const;
}

const controlClass = (error?: string) =>
  `mt-1 block min-h-11 w-full rounded-xl border-2 bg-white px-3 py-2 text-lg ${error ? "border-brick" : "border-ink/20 focus:border-sky"}`;

function FieldFrame({ label, id, error, hint, children }: FieldFrameProps & { children: ReactNode }) {
  return (
    <div>
      <label htmlFor={id} className="font-medium">
        {label}
      </label>
      {children}
      {hint ? (
        <p id={`${id}-hint`} className="mt-1 text-sm text-ink-soft">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${id}-error`} className="mt-1 text-sm font-medium text-brick">
          <Icon name="cross" className="mr-1 inline h-4 w-4 align-[-0.15em]" />
          {error}
        </p>
      ) : null}
    </div>
  );
}

/** A labelled input with its hint and error beneath it, wired for screen readers. */
export function Field({
  label,
  name,
  error,
  hint,
  id = `field-${name}`,
  ...input
}: InputHTMLAttributes<HTMLInputElement> & { label: string; name: string; error?: string; hint?: string }) {
  return (
    <FieldFrame label={label} id={id} error={error} hint={hint}>
      <input name={name} {...fieldAria({ id, error, hint })} className={controlClass(error)} {...input} />
    </FieldFrame>
  );
}

/** A labelled drop-down, with the same hint and error wiring as Field. */
export function SelectField({
  label,
  name,
  error,
  hint,
  id = `field-${name}`,
  options,
  ...select
}: SelectHTMLAttributes<HTMLSelectElement> & {
  label: string;
  name: string;
  error?: string;
  hint?: string;
  options: readonly { value: string; label: string }[];
}) {
  return (
    <FieldFrame label={label} id={id} error={error} hint={hint}>
      <select name={name} {...fieldAria({ id, error, hint })} className={controlClass(error)} {...select}>
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
    </FieldFrame>
  );
}

const noticeTones: Record<"error" | "success" | "info", { box: string; icon: IconName; word: string }> = {
  error: { box: "border-brick bg-brick/10", icon: "cross", word: "Problem" },
  success: { box: "border-teal bg-teal/10", icon: "check", word: "Done" },
  info: { box: "border-sky bg-sky/10", icon: "info", word: "Note" },
} as const;

export function Notice({ tone, children }: { tone: keyof typeof noticeTones; children: ReactNode }) {
  const t = noticeTones[tone];
  return (
    <div role={tone === "error" ? "alert" : "status"} className={`flex gap-3 rounded-2xl border-2 p-3 ${t.box}`}>
      <Icon name={t.icon} className="mt-0.5 h-5 w-5" />
      <span>
        <span className="sr-only">{t.word}: </span>
        {children}
      </span>
    </div>
  );
}

/**
 * Shown only with JavaScript off, where a part of a page can't work without it (live play on
 * WebSockets, timed practice, the map editor): says so plainly instead of a button that does nothing.
 */
export function NeedsJavaScript({ what }: { what: string }) {
  return (
    <noscript>
      <Notice tone="info">{what} needs JavaScript. Turn it on in your browser's settings, then reload this page.</Notice>
    </noscript>
  );
}

const badgeTones: Record<"right" | "miss" | "info" | "neutral", { box: string; icon: IconName }> = {
  right: { box: "bg-teal text-white", icon: "check" },
  miss: { box: "bg-brick text-white", icon: "cross" },
  info: { box: "bg-sky/20 text-ink", icon: "info" },
  neutral: { box: "bg-ink/10 text-ink", icon: "dot" },
} as const;

/** A small state label: always an icon and a word, never a colour alone. */
export function Badge({ tone, children }: { tone: keyof typeof badgeTones; children: ReactNode }) {
  const t = badgeTones[tone];
  return (
    <span className={`inline-flex items-center gap-1 rounded-full px-3 py-0.5 text-sm font-medium ${t.box}`}>
      <Icon name={t.icon} className="h-[1em] w-[1em]" />
      {children}
    </span>
  );
}

export function PageTitle({ children, lead }: { children: ReactNode; lead?: ReactNode }) {
  return (
    <div className="mb-6">
      <h1 className="font-display text-3xl font-semibold sm:text-4xl">{children}</h1>
      {lead ? <p className="mt-2 max-w-2xl text-lg text-ink-soft">{lead}</p> : null}
    </div>
  );
}

/** Why the button beside it is disabled, in visible words (a tooltip reaches neither a phone nor every screen reader); point the button's aria-describedby at its id. */
export function WhyDisabled({ id, children }: { id: string; children: ReactNode }) {
  return (
    <p id={id} className="text-sm text-ink-soft">
      {children}
    </p>
  );
}
