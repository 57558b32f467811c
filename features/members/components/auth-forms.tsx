"use client";

import Link from "next/link";
import { useRouter, useSearchParams } from "next/navigation";
import { useId, useState, type InputHTMLAttributes, type ReactNode } from "react";
import { zodResolver } from "@hookform/resolvers/zod";
import { useForm, type FieldError, type UseFormRegisterReturn } from "react-hook-form";
import { authClient } from "../auth-client";
import { forgotPasswordSchema, PASSWORD_MIN_LENGTH, resetPasswordSchema, signInSchema, signUpSchema } from "../schemas";
import { Button, Field, Notice, TextInput } from "@/features/shared/components/ui";

// better-auth's own errors are { code, message }; the app's limits answer in its envelope { error: { code, message } }.
type Failure =
  { status?: number; message?: string; code?: string; error?: { code?: string; message?: string } } | null | undefined;

/** Turns better-auth's error into a sentence a person can act on. */
function explain(err: Failure, context: "sign-in" | "sign-up" | "reset"): string {
  if (!err) return "Something went wrong. Try again.";
  if (err.status === 429)
    return err.error?.message ?? "Too many attempts in a short time. Wait a few seconds, then try again.";
  if (context === "sign-in" && err.status === 401)
    return "That e-mail and password do not match an account. Check both and try again.";
  if (context === "sign-in" && err.status === 403)
    return "Confirm your e-mail address first: we have sent you a new confirmation link.";
  if (err.code === "USER_ALREADY_EXISTS" || err.code === "USER_ALREADY_EXISTS_USE_ANOTHER_EMAIL")
    return "An account with that e-mail address already exists. Sign in, or reset the password.";
  if (err.code === "PASSWORD_TOO_SHORT") return `Choose a password of at least ${PASSWORD_MIN_LENGTH} characters.`;
  if (err.code === "INVALID_TOKEN") return "This reset link has expired or was already used. Ask for a new one.";
  return err.message ?? err.error?.message ?? "Something went wrong. Try again.";
}

/**
 * What the e-mail confirmation link did. better-auth's verify-email route redirects to the callbackURL either
 * plainly (confirmed) or with `error=<CODE>` (TOKEN_EXPIRED, INVALID_TOKEN, USER_NOT_FOUND, INVALID_USER): an error
 * always wins over the `verified` marker that the callbackURL itself carries.
 */
function verificationOutcome(
  params: URLSearchParams,
): { tone: "info" | "alarm"; title: string; body: ReactNode } | null {
  const error = params.get("error");
  if (error) {
    const code = error.toUpperCase();
    if (code === "TOKEN_EXPIRED")
      return {
        tone: "alarm",
        title: "This confirmation link has expired",
        body: (
          <>
            Your address is not confirmed yet. Links work for one hour: sign in below with your e-mail and password, and
            we send you a fresh link.
          </>
        ),
      };
    if (code === "USER_NOT_FOUND")
      return {
        tone: "alarm",
        title: "This confirmation link has no account",
        body: (
          <>
            The account it was sent for no longer exists. <Link href="/sign-up">Join again</Link> to get a new link.
          </>
        ),
      };
    if (code === "INVALID_USER")
      return {
        tone: "alarm",
        title: "This link is for another account",
        body: <>You are signed in as someone else. Sign out, then open the link from the e-mail again.</>,
      };
    return {
      tone: "alarm",
      title: "This confirmation link is invalid",
      body: (
        <>
          Your address is not confirmed by it: the link may be incomplete (copy the whole of it) or replaced by a newer
          one. Sign in below with your e-mail and password, and we send you a fresh link.
        </>
      ),
    };
  }
  if (params.get("verified"))
    return {
      tone: "info",
      title: "Address confirmed",
      body: <>Your e-mail address is confirmed. Sign in below if this page does not show you signed in.</>,
    };
  if (params.get("reset"))
    return {
      tone: "info",
      title: "Password changed",
      body: <>Sign in with your new password. Other devices were signed out.</>,
    };
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

/**
 * One labelled input of an auth form: its message (from the shared schema) shows once the field was left or the form
 * sent, tied to the input with aria-describedby and aria-invalid, beside the hint.
 */
function AuthField({
  id,
  label,
  hint,
  error,
  registration,
  ...input
}: {
  id: string;
  label: string;
  hint?: string;
  error?: FieldError;
  registration: UseFormRegisterReturn;
} & Omit<InputHTMLAttributes<HTMLInputElement>, "id" | "name">) {
  const describedBy = [hint ? `${id}-hint` : "", error ? `${id}-error` : ""].filter(Boolean).join(" ");
  return (
    <Field label={label} id={id} hint={hint} error={error?.message}>
      <TextInput
        id={id}
        {...input}
        {...registration}
        invalid={Boolean(error)}
        aria-describedby={describedBy || undefined}
      />
    </Field>
  );
}

function FormError({ error }: { error: string | null }) {
  return error ? (
    <p role="alert" className="font-bold text-alarm-700">
      {error}
    </p>
  ) : null;
}

export function SignInForm() {
  const router = useRouter();
  const params = useSearchParams();
  const id = useId();
  const [error, setError] = useState<string | null>(null);
  const outcome = verificationOutcome(params);
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm({ resolver: zodResolver(signInSchema), mode: "onTouched", defaultValues: { email: "", password: "" } });
  const onSubmit = handleSubmit(async ({ email, password }) => {
    setError(null);
    const { error: err } = await authClient.signIn.email({
      email,
      password,
      callbackURL: safeNext(params.get("next")),
    });
    if (err) {
      setError(explain(err, "sign-in"));
      return;
    }
    router.push(safeNext(params.get("next")));
    router.refresh();
  });
  return (
    <FormShell
      title="Sign in"
      footer={
        <p>
          New here? <Link href="/sign-up">Join the registry</Link>. Forgot your password?{" "}
          <Link href="/forgot-password">Reset it</Link>.
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
      <form onSubmit={onSubmit} className="grid gap-4" noValidate>
        <AuthField
          id={`${id}-email`}
          label="E-mail"
          error={errors.email}
          registration={register("email")}
          type="email"
          autoComplete="email"
        />
        <AuthField
          id={`${id}-password`}
          label="Password"
          error={errors.password}
          registration={register("password")}
          type="password"
          autoComplete="current-password"
        />
        <FormError error={error} />
        <Button type="submit" disabled={isSubmitting}>
          {isSubmitting ? "Signing in…" : "Sign in"}
        </Button>
      </form>
    </FormShell>
  );
}

export function SignUpForm() {
  const id = useId();
  const [error, setError] = useState<string | null>(null);
  const [sentTo, setSentTo] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm({
    resolver: zodResolver(signUpSchema),
    mode: "onTouched",
    defaultValues: { name: "", email: "", password: "", confirm: "" },
  });
  const onSubmit = handleSubmit(async ({ name, email, password }) => {
    setError(null);
    const { error: err } = await authClient.signUp.email({ name, email, password, callbackURL: "/sign-in?verified=1" });
    if (err) setError(explain(err, "sign-up"));
    else setSentTo(email);
  });
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
    <FormShell
      title="Join the registry"
      footer={
        <p>
          Already a member? <Link href="/sign-in">Sign in</Link>.
        </p>
      }
    >
      <form onSubmit={onSubmit} className="grid gap-4" noValidate>
        <AuthField
          id={`${id}-name`}
          label="Display name"
          hint="Shown on your reports only when you choose so."
          error={errors.name}
          registration={register("name")}
          autoComplete="nickname"
        />
        <AuthField
          id={`${id}-email`}
          label="E-mail"
          error={errors.email}
          registration={register("email")}
          type="email"
          autoComplete="email"
        />
        <AuthField
          id={`${id}-password`}
          label="Password"
          hint={`At least ${PASSWORD_MIN_LENGTH} characters.`}
          error={errors.password}
          registration={register("password")}
          type="password"
          autoComplete="new-password"
        />
        <AuthField
          id={`${id}-confirm`}
          label="Password again"
          error={errors.confirm}
          registration={register("confirm")}
          type="password"
          autoComplete="new-password"
        />
        <FormError error={error} />
        <Button type="submit" disabled={isSubmitting}>
          {isSubmitting ? "Creating your account…" : "Create account"}
        </Button>
      </form>
    </FormShell>
  );
}

export function ForgotPasswordForm() {
  const id = useId();
  const [sent, setSent] = useState(false);
  const [error, setError] = useState<string | null>(null);
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm({ resolver: zodResolver(forgotPasswordSchema), mode: "onTouched", defaultValues: { email: "" } });
  const onSubmit = handleSubmit(async ({ email }) => {
    setError(null);
    const { error: err } = await authClient.requestPasswordReset({ email, redirectTo: "/reset-password" });
    if (err) setError(explain(err, "reset"));
    else setSent(true);
  });
  return (
    <FormShell title="Reset your password">
      {sent ? (
        <p>If an account uses that address, a reset link is on its way. It works for one hour.</p>
      ) : (
        <form onSubmit={onSubmit} className="grid gap-4" noValidate>
          <AuthField
            id={`${id}-email`}
            label="E-mail"
            error={errors.email}
            registration={register("email")}
            type="email"
            autoComplete="email"
          />
          <FormError error={error} />
          <Button type="submit" disabled={isSubmitting}>
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
  const {
    register,
    handleSubmit,
    formState: { errors, isSubmitting },
  } = useForm({
    resolver: zodResolver(resetPasswordSchema),
    mode: "onTouched",
    defaultValues: { password: "", confirm: "" },
  });
  const onSubmit = handleSubmit(async ({ password }) => {
    setError(null);
    const { error: err } = await authClient.resetPassword({ newPassword: password, token: token ?? "" });
    if (err) setError(explain(err, "reset"));
    else router.push("/sign-in?reset=1");
  });
  return (
    <FormShell
      title={
        linkFailed
          ? "This reset link does not work"
          : token
            ? "Choose a new password"
            : "Open the link from your e-mail"
      }
      footer={<Link href="/forgot-password">Ask for a new link</Link>}
    >
      {linkFailed || !token ? (
        <div role="alert" data-testid="reset-outcome" className="grid gap-2">
          {linkFailed ? (
            <p>
              Your password was not changed. The link has expired (reset links work for a limited time), was already
              used, or is incomplete.
            </p>
          ) : (
            <p>This page needs the whole link from your password-reset e-mail. Your password was not changed.</p>
          )}
          <p>
            Next: <Link href="/forgot-password">ask for a new reset link</Link> and open the newest e-mail.
          </p>
        </div>
      ) : (
        <form onSubmit={onSubmit} className="grid gap-4" noValidate>
          <AuthField
            id={`${id}-password`}
            label="New password"
            hint={`At least ${PASSWORD_MIN_LENGTH} characters.`}
            error={errors.password}
            registration={register("password")}
            type="password"
            autoComplete="new-password"
          />
          <AuthField
            id={`${id}-confirm`}
            label="New password again"
            error={errors.confirm}
            registration={register("confirm")}
            type="password"
            autoComplete="new-password"
          />
          <FormError error={error} />
          <Button type="submit" disabled={isSubmitting}>
            Save the new password
          </Button>
        </form>
      )}
    </FormShell>
  );
}
