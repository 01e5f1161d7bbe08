import Link from "next/link";

export default function NotFound() {
  return (
    <main className="mx-auto flex min-h-[60vh] max-w-lg flex-col justify-center gap-3 px-4">
      <p className="text-sm font-semibold text-spill-600">404</p>
      <h1 className="text-2xl font-semibold">Not found</h1>
      <p className="text-sm text-basin-700">There is no such page, or it belongs to a workspace you are not a member of.</p>
      <Link href="/" className="text-sm font-medium text-basin-700 underline">
        Back to your workspace
      </Link>
    </main>
  );
}
