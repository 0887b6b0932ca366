import Link from "next/link";

export default function NotFound() {
  return (
    <main className="mx-auto max-w-xl px-5 py-16">
      <div className="card">
        <h1>Not found</h1>
        <p className="mt-2">There is nothing here, or it is not shared with your account.</p>
        <p className="mt-4">
          <Link href="/">Back to your workspace</Link>
        </p>
      </div>
    </main>
  );
}
