import type { ButtonHTMLAttributes, InputHTMLAttributes, ReactNode, SelectHTMLAttributes } from "react";

export const ANECDOTAL_NOTICE =
  "Figures in Tanklore are anecdotal: members' own reports of what happened in their tanks, checked by club moderators for plausibility only. They are not veterinary advice.";

export function cx(...parts: (string | false | null | undefined)[]): string {
  return parts.filter(Boolean).join(" ");
}

export function Button({
  variant = "primary",
  className,
  ...rest
}: ButtonHTMLAttributes<HTMLButtonElement> & { variant?: "primary" | "quiet" | "danger" }) {
  const styles = {
    primary: "bg-peat-700 text-white hover:bg-peat-900 disabled:bg-peat-300",
    quiet: "border border-peat-300 bg-white text-peat-900 hover:bg-peat-50 disabled:text-peat-300",
    danger: "bg-alarm-500 text-white hover:bg-alarm-700",
  }[variant];
  return (
    <button className={cx("rounded-md px-4 py-2 font-bold disabled:cursor-not-allowed", styles, className)} {...rest} />
  );
}

export function Field({
  label,
  id,
  hint,
  error,
  children,
}: {
  label: string;
  id: string;
  hint?: string;
  error?: string | null;
  children: ReactNode;
}) {
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-bold">
        {label}
      </label>
      {hint ? (
        <p id={`${id}-hint`} className="text-sm text-peat-700">
          {hint}
        </p>
      ) : null}
      {children}
      {error ? (
        <p id={`${id}-error`} role="alert" className="text-sm font-bold text-alarm-700">
          {error}
        </p>
      ) : null}
    </div>
  );
}

export function TextInput({
  className,
  invalid,
  ...rest
}: InputHTMLAttributes<HTMLInputElement> & { invalid?: boolean }) {
  return (
    <input
      aria-invalid={invalid || undefined}
      className={cx(
        "rounded-md border bg-white px-3 py-2",
        invalid ? "border-alarm-500" : "border-peat-300",
        className,
      )}
      {...rest}
    />
  );
}

export function Select({ className, ...rest }: SelectHTMLAttributes<HTMLSelectElement>) {
  return <select className={cx("rounded-md border border-peat-300 bg-white px-3 py-2", className)} {...rest} />;
}

export function Notice({
  tone = "info",
  title,
  children,
}: {
  tone?: "info" | "caution" | "alarm";
  title?: string;
  children: ReactNode;
}) {
  const styles = {
    info: "border-peat-300 bg-peat-50",
    caution: "border-reed-500 bg-reed-100",
    alarm: "border-alarm-500 bg-alarm-100",
  }[tone];
  return (
    <div className={cx("rounded-md border-l-4 p-4", styles)} role={tone === "alarm" ? "alert" : undefined}>
      {title ? <p className="mb-1 font-bold">{title}</p> : null}
      <div className="text-sm leading-relaxed">{children}</div>
    </div>
  );
}

export function PageTitle({ children, lead }: { children: ReactNode; lead?: ReactNode }) {
  return (
    <header className="mb-6">
      <h1 className="text-3xl font-bold text-peat-900">{children}</h1>
      {lead ? <p className="mt-2 max-w-2xl text-peat-700">{lead}</p> : null}
    </header>
  );
}
