"use client";

import Link from "next/link";
import { useRouter, useSearchParams } from "next/navigation";
import { useId, useState, type FormEvent, type ReactNode } from "react";
import { authClient } from "../auth-client";
import { Button, Field, Notice, TextInput } from "@/features/shared/components/ui";

// better-auth's own errors are { code, message }; the app's limits answer in its envelope { error: { code, message } }.
type Failure = { status?: number; message?: string; code?: string; error?: { code?: string; message?: string } } | null | undefined;

/** Turns better-auth's error into a sentence a person can act on. */
function explain(err: Failure, context: "sign-in" | "sign-up" | "reset"): string {
  if (!err) return "Something went wrong. Try again.";
  if (err.status === 429) return err.error?.message ?? "Too many attempts in a short time. Wait a few seconds, then try again.";
  if (context === "sign-in" && err.status === 401) return "That e-mail and password do not match an account. Check both and try again.";
  if (context === "sign-in" && err.status === 403)
    return "Confirm your e-mail address first: we have sent you a new confirmation link.";
  if (err.code === "USER_ALREADY_EXISTS" || err.code === "USER_ALREADY_EXISTS_USE_ANOTHER_EMAIL")
    return "An account with that e-mail address already exists. Sign in, or reset the password.";
  if (err.code === "PASSWORD_TOO_SHORT") return "Choose a password of at least 10 characters.";
  if (err.code === "INVALID_TOKEN") return "This reset link has expired or was already used. Ask for a new one.";
  return err.message ?? err.error?.message ?? "Something went wrong. Try again.";
}

/**
 * What the e-mail confirmation link did. better-auth's verify-email route redirects to the callbackURL either
 * plainly (confirmed) or with `error=<CODE>` (TOKEN_EXPIRED, INVALID_TOKEN, USER_NOT_FOUND, INVALID_USER): an error
 * always wins over the `verified` marker that the callbackURL itself carries.
 */
function verificationOutcome(params: URLSearchParams): { tone: "info" | "alarm"; title: string; body: ReactNode } | null {
  const error = params.get("error");
  if (error) {
    const code = error.toUpperCase();
    if (code === "TOKEN_EXPIRED")
      return { tone: "alarm", title: "This confirmation link has expired", body: <>Your address is not confirmed yet. Links work for one hour: sign in below with your e-mail and password, and we send you a fresh link.</> };
    if (code === "USER_NOT_FOUND")
      return { tone: "alarm", title: "This confirmation link has no account", body: <>The account it was sent for no longer exists. <Link href="/sign-up">Join again</Link> to get a new link.</> };
    if (code === "INVALID_USER")
      return { tone: "alarm", title: "This link is for another account", body: <>You are signed in as someone else. Sign out, then open the link from the e-mail again.</> };
    return { tone: "alarm", title: "This confirmation link is invalid", body: <>Your address is not confirmed by it: the link may be incomplete (copy the whole of it) or replaced by a newer one. Sign in below with your e-mail and password, and we send you a fresh link.</> };
  }
  if (params.get("verified")) return { tone: "info", title: "Address confirmed", body: <>Your e-mail address is confirmed. Sign in below if this page does not show you signed in.</> };
  if (params.get("reset")) return { tone: "info", title: "Password changed", body: <>Sign in with your new password. Other devices were signed out.</> };
  return null;
}

function FormShell({ title, children, footer }: { title: string; children: ReactNode; footer?: ReactNode }) {
  return (
    <div className="mx-auto max-w-md rounded-xl border border-peat-100 bg-white p-6 shadow-sm">
      <h1 className="mb-4 text-2xl font-bold text-peat-900">{title}</h1>
      {children}
      {footer ? <div className="mt-6 text-sm">{footer}</div> : null}
    </div>
  );
}

function safeNext(next: string | null): string {
  return next && next.startsWith("/") && !next.startsWith("//") ? next : "/";
}

export function SignInForm() {
  const router = useRouter();
  const params = useSearchParams();
  const id = useId();
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const outcome = verificationOutcome(params);
  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    setBusy(true);
    setError(null);
    const { error: err } = await authClient.signIn.email({
      email: String(data.get("email") ?? ""),
      password: String(data.get("password") ?? ""),
      callbackURL: safeNext(params.get("next")),
    });
    setBusy(false);
    if (err) {
      setError(explain(err, "sign-in"));
      return;
    }
    router.push(safeNext(params.get("next")));
    router.refresh();
  }
  return (
    <FormShell
      title="Sign in"
      footer={
        <p>
          New here? <Link href="/sign-up">Join the registry</Link>. Forgot your password? <Link href="/forgot-password">Reset it</Link>.
        </p>
      }
    >
      {outcome ? (
        <div data-testid="verification-outcome" className="mb-4">
          <Notice tone={outcome.tone} title={outcome.title}>
            {outcome.body}
          </Notice>
        </div>
      ) : null}
      <form onSubmit={onSubmit} className="grid gap-4" noValidate={false}>
        <Field label="E-mail" id={`${id}-email`}>
          <TextInput id={`${id}-email`} name="email" type="email" autoComplete="email" required />
        </Field>
        <Field label="Password" id={`${id}-password`}>
          <TextInput id={`${id}-password`} name="password" type="password" autoComplete="current-password" required />
        </Field>
        {error ? (
          <p role="alert" className="font-bold text-alarm-700">
            {error}
          </p>
        ) : null}
        <Button type="submit" disabled={busy}>
          {busy ? "Signing in…" : "Sign in"}
        </Button>
      </form>
    </FormShell>
  );
}

export function SignUpForm() {
  const id = useId();
  const [error, setError] = useState<string | null>(null);
  const [sentTo, setSentTo] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    const password = String(data.get("password") ?? "");
    if (password !== String(data.get("confirm") ?? "")) {
      setError("The two passwords differ. Type the same password twice.");
      return;
    }
    const email = String(data.get("email") ?? "");
    setBusy(true);
    setError(null);
    const { error: err } = await authClient.signUp.email({
      name: String(data.get("name") ?? "").trim(),
      email,
      password,
      callbackURL: "/sign-in?verified=1",
    });
    setBusy(false);
    if (err) setError(explain(err, "sign-up"));
    else setSentTo(email);
  }
  if (sentTo) {
    return (
      <FormShell title="Check your inbox">
        <p>
          We sent a confirmation link to <strong>{sentTo}</strong>. Open it to finish joining; it works for one hour.
        </p>
      </FormShell>
    );
  }
  return (
    <FormShell title="Join the registry" footer={<p>Already a member? <Link href="/sign-in">Sign in</Link>.</p>}>
      <form onSubmit={onSubmit} className="grid gap-4">
        <Field label="Display name" id={`${id}-name`} hint="Shown on your reports only when you choose so.">
          <TextInput id={`${id}-name`} name="name" autoComplete="nickname" required minLength={2} maxLength={60} />
        </Field>
        <Field label="E-mail" id={`${id}-email`}>
          <TextInput id={`${id}-email`} name="email" type="email" autoComplete="email" required />
        </Field>
        <Field label="Password" id={`${id}-password`} hint="At least 10 characters.">
          <TextInput id={`${id}-password`} name="password" type="password" autoComplete="new-password" required minLength={10} />
        </Field>
        <Field label="Password again" id={`${id}-confirm`}>
          <TextInput id={`${id}-confirm`} name="confirm" type="password" autoComplete="new-password" required minLength={10} />
        </Field>
        {error ? (
          <p role="alert" className="font-bold text-alarm-700">
            {error}
          </p>
        ) : null}
        <Button type="submit" disabled={busy}>
          {busy ? "Creating your account…" : "Create account"}
        </Button>
      </form>
    </FormShell>
  );
}

export function ForgotPasswordForm() {
  const id = useId();
  const [sent, setSent] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    setBusy(true);
    const { error: err } = await authClient.requestPasswordReset({
      email: String(data.get("email") ?? ""),
      redirectTo: "/reset-password",
    });
    setBusy(false);
    if (err) setError(explain(err, "reset"));
    else setSent(true);
  }
  return (
    <FormShell title="Reset your password">
      {sent ? (
        <p>If an account uses that address, a reset link is on its way. It works for one hour.</p>
      ) : (
        <form onSubmit={onSubmit} className="grid gap-4">
          <Field label="E-mail" id={`${id}-email`}>
            <TextInput id={`${id}-email`} name="email" type="email" autoComplete="email" required />
          </Field>
          {error ? (
            <p role="alert" className="font-bold text-alarm-700">
              {error}
            </p>
          ) : null}
          <Button type="submit" disabled={busy}>
            Send the reset link
          </Button>
        </form>
      )}
    </FormShell>
  );
}

export function ResetPasswordForm() {
  const params = useSearchParams();
  const router = useRouter();
  const id = useId();
  const token = params.get("token");
  // better-auth answers an unknown, used and expired reset link alike (error=INVALID_TOKEN): say all three.
  const linkFailed = !!params.get("error");
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  async function onSubmit(e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const data = new FormData(e.currentTarget);
    const password = String(data.get("password") ?? "");
    if (password !== String(data.get("confirm") ?? "")) {
      setError("The two passwords differ. Type the same password twice.");
      return;
    }
    setBusy(true);
    const { error: err } = await authClient.resetPassword({ newPassword: password, token: token ?? "" });
    setBusy(false);
    if (err) setError(explain(err, "reset"));
    else router.push("/sign-in?reset=1");
  }
  return (
    <FormShell title={linkFailed ? "This reset link does not work" : token ? "Choose a new password" : "Open the link from your e-mail"} footer={<Link href="/forgot-password">Ask for a new link</Link>}>
      {linkFailed || !token ? (
        <div role="alert" data-testid="reset-outcome" className="grid gap-2">
          {linkFailed ? (
            <p>
              Your password was not changed. The link has expired (reset links work for a limited time), was already used, or is incomplete.
            </p>
          ) : (
            <p>This page needs the whole link from your password-reset e-mail. Your password was not changed.</p>
          )}
          <p>
            Next: <Link href="/forgot-password">ask for a new reset link</Link> and open the newest e-mail.
          </p>
        </div>
      ) : (
        <form onSubmit={onSubmit} className="grid gap-4">
          <Field label="New password" id={`${id}-password`} hint="At least 10 characters.">
            <TextInput id={`${id}-password`} name="password" type="password" autoComplete="new-password" required minLength={10} />
          </Field>
          <Field label="New password again" id={`${id}-confirm`}>
            <TextInput id={`${id}-confirm`} name="confirm" type="password" autoComplete="new-password" required minLength={10} />
          </Field>
          {error ? (
            <p role="alert" className="font-bold text-alarm-700">
              {error}
            </p>
          ) : null}
          <Button type="submit" disabled={busy}>
            Save the new password
          </Button>
        </form>
      )}
    </FormShell>
  );
}
