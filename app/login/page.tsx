import { SafetyNotice } from "@/components/safety-notice";
import { SignInForm } from "@/components/sign-in-form";
import { afterSignInPath } from "@/shared/callback-url";

export const metadata = { title: "Sign in" };

export default async function LoginPage({ searchParams }: { searchParams: Promise<{ callbackUrl?: string }> }) {
  const { callbackUrl } = await searchParams;
  const safeCallback = afterSignInPath(callbackUrl);
  return (
    <div className="flex min-h-screen flex-col">
      <main className="flex flex-1 items-center justify-center p-6">
        <div className="w-full max-w-sm space-y-4 rounded border border-line bg-raised p-6 shadow-sm">
          <div>
            <h1 className="text-2xl font-bold">Airkeep</h1>
            <p className="text-sm text-muted">Breathing-air compressor monitoring</p>
          </div>
          <SignInForm callbackUrl={safeCallback} />
        </div>
      </main>
      <SafetyNotice />
    </div>
  );
}
