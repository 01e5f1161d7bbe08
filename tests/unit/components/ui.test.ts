// Server-rendered markup checks: the ARIA wiring is what these components promise, so test it without a DOM.
import { createElement as h, type ReactElement } from "react";
import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import type { ColumnDef } from "@tanstack/react-table";
import {
  Badge,
  Button,
  Callout,
  ConfirmDialog,
  DataTable,
  Dialog,
  EmptyState,
  Field,
  FieldError,
  FormError,
  type FieldControlProps,
  Input,
  LinkButton,
  RoleBadge,
  Select,
  Spinner,
  Stat,
  cn,
} from "@/components/ui";

const html = (el: ReactElement) => renderToStaticMarkup(el);

describe("cn", () => {
  it("drops falsy parts and flattens arrays", () => {
    expect(cn("a", false, null, undefined, 0, ["b", ["c", false]], "")).toBe("a b c");
  });
});

describe("Button", () => {
  it("defaults to type=button so it never submits a form by accident", () => {
    expect(html(h(Button, null, "Run"))).toContain('type="button"');
  });

  it("forwards an explicit type", () => {
    expect(html(h(Button, { type: "submit" }, "Save"))).toContain('type="submit"');
  });

  it("disables and marks busy while pending", () => {
    const out = html(h(Button, { pending: true }, "Queue run"));
    expect(out).toContain("disabled");
    expect(out).toContain('aria-busy="true"');
    expect(out).toContain("<svg");
  });

  it("uses the danger palette for the danger variant", () => {
    expect(html(h(Button, { variant: "danger" }, "Delete"))).toContain("bg-red-700");
  });

  it("LinkButton renders an anchor styled as a button", () => {
    const out = html(h(LinkButton, { href: "/runs", variant: "secondary" }, "All runs"));
    expect(out).toMatch(/^<a /);
    expect(out).toContain('href="/runs"');
    expect(out).toContain("border-basin-200");
  });
});

describe("Field", () => {
  it("links label, hint and error to the control", () => {
    const out = html(
      h(Field, {
        label: "Offered traffic",
        hint: "In erlangs",
        error: "Must be positive",
        id: "offered",
        required: true,
        children: h(Input, { name: "offered" }),
      }),
    );
    expect(out).toContain('for="offered"');
    expect(out).toContain('id="offered"');
    expect(out).toContain('aria-invalid="true"');
    expect(out).toContain('aria-describedby="offered-hint offered-error"');
    expect(out).toContain('aria-required="true"');
    expect(out).toContain('id="offered-error"');
    expect(out).toContain('role="alert"');
  });

  it("generates an id when none is given and omits aria-invalid without an error", () => {
    const out = html(h(Field, { label: "Circuits", children: h(Input, { name: "circuits" }) }));
    const forId = /for="([^"]+)"/.exec(out)?.[1];
    expect(forId).toBeTruthy();
    expect(out).toContain(`id="${forId}"`);
    expect(out).not.toContain("aria-invalid");
    expect(out).not.toContain("aria-describedby");
  });

  it("keeps the control's own id and describedby", () => {
    const out = html(
      h(Field, {
        label: "Model",
        hint: "Pick one",
        children: h(Select, { id: "model", "aria-describedby": "extra" }, h("option", null, "A")),
      }),
    );
    expect(out).toContain('for="model"');
    expect(out).toContain('aria-describedby="extra model-hint"');
  });

  it("supports a render function for custom controls", () => {
    const out = html(h(Field, { label: "Seed", id: "seed", error: "Required", children: (p: FieldControlProps) => h("input", { ...p, "data-custom": "" }) }));
    expect(out).toContain('id="seed"');
    expect(out).toContain("data-custom");
    expect(out).toContain('aria-describedby="seed-error"');
  });

  it("FieldError and FormError render nothing when empty", () => {
    expect(html(h(FieldError, null))).toBe("");
    expect(html(h(FormError, null))).toBe("");
    expect(html(h(FormError, { title: "Could not save" }, "Try again."))).toContain('role="alert"');
  });
});

type Row = { name: string; blocking: number };
const columns: ColumnDef<Row, unknown>[] = [
  { accessorKey: "name", header: "Scenario" },
  { accessorKey: "blocking", header: "Blocking", meta: { numeric: true } },
  { id: "note", header: "Note", enableSorting: false, cell: () => "n/a" },
];

describe("DataTable", () => {
  it("shows the empty message across all columns", () => {
    const out = html(h(DataTable<Row>, { data: [], columns, emptyMessage: "No runs yet." }));
    expect(out).toMatch(/colspan="3"/i);
    expect(out).toContain("No runs yet.");
  });

  it("sets aria-sort on sortable headers only and sorts by the initial state", () => {
    const data: Row[] = [
      { name: "Ward B", blocking: 0.02 },
      { name: "Trunk A", blocking: 0.0085 },
    ];
    const out = html(
      h(DataTable<Row>, { data, columns, caption: "Runs", initialSorting: [{ id: "blocking", desc: false }] }),
    );
    expect(out).toContain("<caption");
    expect(out).toContain('aria-sort="none"');
    expect(out).toContain('aria-sort="ascending"');
    expect((out.match(/aria-sort=/g) ?? []).length).toBe(2);
    expect(out.indexOf("Trunk A")).toBeLessThan(out.indexOf("Ward B"));
    expect(out).toContain("text-right tabular-nums");
    expect(out).toContain('<button type="button"');
  });
});

describe("Dialog", () => {
  it("labels the native dialog by its title and description", () => {
    const out = html(h(Dialog, { open: false, onClose: () => {}, title: "Rename", description: "Pick a new name" }, "body"));
    expect(out).toMatch(/^<dialog /);
    const labelled = /aria-labelledby="([^"]+)"/.exec(out)?.[1];
    const described = /aria-describedby="([^"]+)"/.exec(out)?.[1];
    expect(out).toContain(`<h2 id="${labelled}"`);
    expect(out).toContain(`id="${described}"`);
    expect(out).toContain('aria-label="Close"');
  });

  it("ConfirmDialog puts initial focus on Cancel when dangerous", () => {
    const out = html(
      h(ConfirmDialog, { open: false, onClose: () => {}, onConfirm: () => {}, title: "Delete run?", message: "This cannot be undone.", confirmLabel: "Delete", danger: true }),
    );
    expect(out).toMatch(/<button[^>]*data-autofocus="true"[^>]*>Cancel<\/button>/);
    expect(out).toContain("bg-red-700");
  });
});

describe("display components", () => {
  it("RoleBadge gives each role a distinct tone", () => {
    const classes = (["admin", "engineer", "reviewer", "viewer"] as const).map((role) =>
      /class="([^"]+)"/.exec(html(h(RoleBadge, { role })))?.[1],
    );
    expect(new Set(classes).size).toBe(4);
    expect(html(h(RoleBadge, { role: "reviewer" }))).toContain(">Reviewer<");
  });

  it("Badge warning uses the spill palette", () => {
    expect(html(h(Badge, { tone: "warning" }, "Over target"))).toContain("bg-spill-50");
  });

  it("Callout is a note, not a live alert", () => {
    const out = html(h(Callout, { tone: "warning", title: "Safety-critical sizing" }, "Check against local standards."));
    expect(out).toContain('role="note"');
    expect(out).toContain("Safety-critical sizing");
  });

  it("Stat renders a description list", () => {
    const out = html(h(Stat, { label: "Blocking", value: "0.85 %", hint: "Target 1 %" }));
    expect(out).toMatch(/^<dl/);
    expect(out).toContain("<dt");
    expect(out).toContain("0.85 %");
  });

  it("Spinner is decorative without a label and a status with one", () => {
    expect(html(h(Spinner))).toContain('aria-hidden="true"');
    expect(html(h(Spinner, { label: "Loading runs" }))).toContain('role="status"');
  });

  it("EmptyState shows title and action", () => {
    const out = html(h(EmptyState, { title: "No scenarios", action: h(Button, null, "New scenario") }));
    expect(out).toContain("No scenarios");
    expect(out).toContain("New scenario");
  });
});

describe("react-hook-form integration", () => {
  it("register() spreads onto Input inside Field, ref included", async () => {
    const { useForm } = await import("react-hook-form");
    function Form() {
      const { register } = useForm<{ servers: number }>({ defaultValues: { servers: 12 } });
      return h(Field, { label: "Servers", id: "servers", children: h(Input, { type: "number", ...register("servers") }) });
    }
    const out = html(h(Form));
    expect(out).toContain('name="servers"');
    expect(out).toContain('id="servers"');
  });
});
