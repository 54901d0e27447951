import Link from "next/link";

export default function Forbidden() {
  return (
    <main className="mx-auto max-w-xl space-y-3 p-8">
      <h1 className="text-2xl font-semibold">Not allowed</h1>
      <p className="text-muted">Your role does not include this page. Ask an administrator if you need it.</p>
      <Link href="/board" className="underline">
        Back to the board
      </Link>
    </main>
  );
}
