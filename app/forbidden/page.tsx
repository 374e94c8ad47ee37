import Link from "next/link";

export default function ForbiddenPage() {
  return (
    <main className="mx-auto max-w-lg px-4 py-16">
      <h1 className="mb-2 text-2xl font-bold">Not for your role</h1>
      <p className="mb-6">Your role does not open this page. Ask an admin if you need it.</p>
      <Link href="/" className="btn-quiet">Back to the overview</Link>
    </main>
  );
}
