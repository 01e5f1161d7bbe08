"use client";

import { useMutation } from "@tanstack/react-query";
import { useState } from "react";
import { Button, Card, CardBody, CardHeader, CardTitle, Field, FormError, Input, Stat, StatGroup } from "@/components/ui";

interface ApiError {
  error: { message: string; fields?: Record<string, string> };
}

async function evaluateErlangB(input: { servers: number; traffic: number }) {
  const response = await fetch("/api/v1/analytic/erlang-b", {
    method: "POST",
    headers: { "content-type": "application/json" },
    body: JSON.stringify(input),
  });
  const body = await response.json();
  if (!response.ok) throw Object.assign(new Error((body as ApiError).error.message), { fields: (body as ApiError).error.fields });
  return body.result as { blocking: number; carriedTraffic: number; lostTraffic: number; occupancyPerServer: number };
}

const percent = (x: number) => (x < 1e-4 ? x.toExponential(2) : `${(x * 100).toPrecision(3)} %`);

/** A first closed-form check: Erlang B blocking for a group, straight from the analytic API. */
export function ErlangBCheck() {
  const [servers, setServers] = useState("30");
  const [traffic, setTraffic] = useState("20");
  const mutation = useMutation({ mutationFn: evaluateErlangB });
  const fields = (mutation.error as (Error & { fields?: Record<string, string> }) | null)?.fields ?? {};
  return (
    <Card>
      <CardHeader>
        <CardTitle>Erlang B check</CardTitle>
      </CardHeader>
      <CardBody>
        <form
          noValidate
          className="grid grid-cols-2 gap-4"
          aria-label="Erlang B check"
          onSubmit={(event) => {
            event.preventDefault();
            mutation.mutate({ servers: Number(servers), traffic: Number(traffic) });
          }}
        >
          <Field label="Servers (circuits)" error={fields.servers}>
            <Input inputMode="decimal" value={servers} onChange={(e) => setServers(e.target.value)} />
          </Field>
          <Field label="Offered traffic (erlangs)" error={fields.traffic}>
            <Input inputMode="decimal" value={traffic} onChange={(e) => setTraffic(e.target.value)} />
          </Field>
          <div className="col-span-2">
            <Button type="submit" pending={mutation.isPending}>
              Evaluate
            </Button>
          </div>
        </form>
        {mutation.isError && !Object.keys(fields).length && <FormError>{mutation.error.message}</FormError>}
        {mutation.data && (
          <div className="mt-5" data-testid="erlang-b-result">
            <StatGroup>
              <Stat label="Blocking (time = call congestion)" value={percent(mutation.data.blocking)} />
              <Stat label="Carried traffic" value={`${mutation.data.carriedTraffic.toFixed(3)} E`} />
              <Stat label="Lost traffic" value={`${mutation.data.lostTraffic.toFixed(4)} E`} />
            </StatGroup>
            <p className="mt-3 text-xs text-basin-600">Assumes Poisson arrivals, blocked calls cleared, statistical equilibrium.</p>
          </div>
        )}
      </CardBody>
    </Card>
  );
}
