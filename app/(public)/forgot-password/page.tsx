import { Suspense } from "react";
import { ForgotPasswordForm } from "@/features/members/components/auth-forms";

export const metadata = { title: "Reset your password" };

export default function Page() {
  return (
    <Suspense>
      <ForgotPasswordForm />
    </Suspense>
  );
}
