import Link from "next/link";

export default function Forbidden() {
  return (
    <main className="mx-auto flex min-h-[60vh] max-w-lg flex-col justify-center gap-3 px-4">
      <p className="text-sm font-semibold text-spill-600">403</p>
      <h1 className="text-2xl font-semibold">Your role does not allow this</h1>
      <p className="text-sm text-basin-700">
        You are a member of this workspace, but this page needs another role. Ask a workspace admin if you need it.
      </p>
      <Link href="/" className="text-sm font-medium text-basin-700 underline">
        Back to your workspace
      </Link>
    </main>
  );
}
