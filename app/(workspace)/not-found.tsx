import Link from "next/link";

export default function WorkspaceNotFound() {
  return (
    <div className="card max-w-xl">
      <h1>Not found</h1>
      <p className="mt-2">There is nothing here, or it is not shared with your account.</p>
      <p className="mt-4">
        <Link href="/studies">Back to studies</Link>
      </p>
    </div>
  );
}
