"use client";

import { useState } from "react";
import { Card, CardBody, CardHeader, CardTitle, Field, LinkButton, PageHeader, Select, Table, TBody, TD, TH, THead, TR } from "@/components/ui";
import { QueryView } from "@/components/lab/states";
import { formatDateTime } from "@/lib/client/format";
import { useScenario, useScenarioRevision, useScenarioRevisions } from "@/lib/client/queries/scenarios";
import { diffScenarios } from "@/lib/client/scenario-diff";

const show = (v: unknown) => (v === undefined ? "—" : typeof v === "string" ? v : JSON.stringify(v));

export function RevisionHistory({ workspace, scenarioId }: { workspace: string; scenarioId: string }) {
  const scenario = useScenario(workspace, scenarioId);
  const revisions = useScenarioRevisions(workspace, scenarioId);
  const latest = scenario.data?.latestRevision;
  const [from, setFrom] = useState<number | undefined>();
  const [to, setTo] = useState<number | undefined>();
  const left = from ?? (latest && latest > 1 ? latest - 1 : latest);
  const right = to ?? latest;
  const a = useScenarioRevision(workspace, scenarioId, left);
  const b = useScenarioRevision(workspace, scenarioId, right);
  const changes = a.data && b.data ? diffScenarios(a.data.scenario, b.data.scenario) : null;
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        eyebrow="Scenario"
        title={scenario.data ? `${scenario.data.name}: revisions` : "Revisions"}
        description="Every save is a new, unchangeable revision; a run always names the revision it simulated."
        actions={
          <LinkButton variant="secondary" href={`/w/${workspace}/scenarios/${scenarioId}`}>
            Back to the scenario
          </LinkButton>
        }
      />
      <Card>
        <CardHeader>
          <CardTitle as="h2">History</CardTitle>
        </CardHeader>
        <CardBody>
          <QueryView query={revisions} label="Loading revisions">
            {(list) => (
              <Table>
                <caption className="sr-only">Revisions, newest first</caption>
                <THead>
                  <TR>
                    <TH>Revision</TH>
                    <TH>Note</TH>
                    <TH>By</TH>
                    <TH>When</TH>
                  </TR>
                </THead>
                <TBody>
                  {list.map((r) => (
                    <TR key={r.revision}>
                      <TD>{r.revision}</TD>
                      <TD>{r.note || <span className="text-basin-500">No note</span>}</TD>
                      <TD>{r.createdBy?.name ?? r.createdBy?.email ?? "–"}</TD>
                      <TD className="whitespace-nowrap">{formatDateTime(r.createdAt)}</TD>
                    </TR>
                  ))}
                </TBody>
              </Table>
            )}
          </QueryView>
        </CardBody>
      </Card>
      <Card>
        <CardHeader>
          <CardTitle as="h2">Compare two revisions</CardTitle>
        </CardHeader>
        <CardBody className="flex flex-col gap-4">
          {revisions.data && (
            <div className="flex flex-wrap gap-3">
              <RevisionSelect label="From revision" revisions={revisions.data} value={left} onChange={setFrom} />
              <RevisionSelect label="To revision" revisions={revisions.data} value={right} onChange={setTo} />
            </div>
          )}
          {a.isError || b.isError ? (
            <QueryView query={a.isError ? a : b} label="">
              {() => null}
            </QueryView>
          ) : !changes ? (
            <p className="text-sm text-basin-700" aria-busy="true">
              Loading both revisions …
            </p>
          ) : changes.length === 0 ? (
            <p className="text-sm text-basin-700">Revisions {left} and {right} simulate the same scenario.</p>
          ) : (
            <Table>
              <caption className="sr-only">
                Fields that differ between revision {left} and revision {right}
              </caption>
              <THead>
                <TR>
                  <TH>Field</TH>
                  <TH>Revision {left}</TH>
                  <TH>Revision {right}</TH>
                </TR>
              </THead>
              <TBody>
                {changes.map((c) => (
                  <TR key={c.path} data-testid="diff-row">
                    <TD className="font-mono text-xs">{c.path}</TD>
                    <TD className={c.kind !== "added" ? "bg-red-50 font-mono text-xs" : "font-mono text-xs"}>{show(c.before)}</TD>
                    <TD className={c.kind !== "removed" ? "bg-emerald-50 font-mono text-xs" : "font-mono text-xs"}>{show(c.after)}</TD>
                  </TR>
                ))}
              </TBody>
            </Table>
          )}
        </CardBody>
      </Card>
    </div>
  );
}

function RevisionSelect({ label, revisions, value, onChange }: { label: string; revisions: { revision: number }[]; value: number | undefined | null; onChange: (revision: number) => void }) {
  return (
    <Field label={label} className="w-40">
      <Select value={value ?? ""} onChange={(e) => onChange(Number(e.target.value))}>
        {revisions.map((r) => (
          <option key={r.revision} value={r.revision}>
            {r.revision}
          </option>
        ))}
      </Select>
    </Field>
  );
}
