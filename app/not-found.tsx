import Link from "next/link";

export default function NotFound() {
  return (
    <main className="mx-auto max-w-lg px-4 py-16">
      <h1 className="mb-2 text-2xl font-bold">Not found</h1>
      <p className="mb-6">There is nothing here, or it belongs to another organisation.</p>
      <Link href="/" className="btn-quiet">Back to the overview</Link>
    </main>
  );
}
