import schema from "../../../../../lib/simulation/scenario.schema.json";

export async function GET() {
  return Response.json(schema);
}
