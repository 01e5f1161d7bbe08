import { jsonError } from "@/lib/api/respond";

// Any /api/v1 path no route claims: the JSON error shape instead of the HTML 404 page.
const notFound = async (request: Request) => jsonError(404, "not-found", `No API route ${new URL(request.url).pathname}. See the README's API section.`);

export const GET = notFound;
export const HEAD = notFound;
export const POST = notFound;
export const PUT = notFound;
export const PATCH = notFound;
export const DELETE = notFound;
export const OPTIONS = notFound;
