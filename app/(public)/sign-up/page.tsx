import { Suspense } from "react";
import { SignUpForm } from "@/features/members/components/auth-forms";

export const metadata = { title: "Join" };

export default function Page() {
  return (
    <Suspense>
      <SignUpForm />
    </Suspense>
  );
}
