// Characterisation: data limitations as input errors, implausible calls named in the notes, and
// daylight-saving changes (each record on its own clock).
import { describe, expect, it } from "vitest";
import seedrandom from "seedrandom";
import { characterise, MeasurementInputError } from "../../../lib/measurement";
import type { CallRecordSet } from "../../../lib/measurement/records";
import { formatLocal } from "../../../lib/measurement/timestamps";

const HOUR = 3_600_000;

/** Records from (start instant ms, duration s, offset min); answered unless `outcome` says otherwise. */
function records(rows: Array<[number, number, number?]>, outcome?: number[]): CallRecordSet {
  const n = rows.length;
  const offsets: number[] = [];
  for (const [, , o = 0] of rows) if (!offsets.includes(o)) offsets.push(o);
  return {
    kind: "call-records",
    count: n,
    start: Float64Array.from(rows, (r) => r[0]),
    offset: Int16Array.from(rows, (r) => r[2] ?? 0),
    duration: Float64Array.from(rows, (r) => r[1]),
    outcome: outcome ? Uint8Array.from(outcome) : new Uint8Array(n),
    group: new Uint16Array(n),
    groups: [""],
    hasOutcome: !!outcome,
    hasGroup: false,
    offsets,
  };
}

/** Poisson arrivals at `perHour` with exponential holding of mean `mean` s, from t0 for `hours` (seeded). */
function poisson(t0: number, hours: number, perHour: number, mean: number, seed: string, offset = 0): Array<[number, number, number]> {
  const u = seedrandom.alea(seed);
  const rows: Array<[number, number, number]> = [];
  for (let t = t0 - (Math.log(1 - u()) / perHour) * HOUR; t < t0 + hours * HOUR; t -= (Math.log(1 - u()) / perHour) * HOUR)
    rows.push([Math.round(t), Math.round(-mean * Math.log(1 - u()) * 10) / 10, offset]);
  return rows;
}

describe("implausibly long calls are named in the notes", () => {
  const t0 = Date.UTC(2026, 3, 6);
  const base = poisson(t0, 48, 60, 120, "long");
  const withCall = (seconds: number) => {
    const at = t0 + 22 * HOUR + 500;
    const rows = [...base.filter((r) => r[0] < at), [at, seconds, 0] as [number, number, number], ...base.filter((r) => r[0] >= at)];
    return characterise(records(rows), { fit: { replicates: 0 } });
  };

  it("a 30 h call that decides the busy hour: named by its start, its length and its share", () => {
    const c = withCall(108_000);
    // the definition is kept: its whole holding time is charged to its start interval
    expect(c.busyHour.startMinute).toBeLessThanOrEqual(22 * 60);
    expect(c.busyHour.startMinute + 60).toBeGreaterThan(22 * 60);
    const note = c.notes.find((n) => n.startsWith("Check the call"));
    expect(note).toMatch(/^Check the call starting 2026-04-06T22:00:00Z: its holding time of 108000 s \(30\.0 h\) is longer than 24 h and alone makes up \d+ % of the busy hour's offered traffic/);
    expect(note).toContain(`(${c.busyHour.label})`);
    // share = 30 erlang-hours / 2 days / the busy hour's mean traffic
    expect(Number(note!.match(/makes up (\d+) %/)![1])).toBe(Math.round((30 / 2 / c.busyHour.meanTraffic) * 100));
  });

  it("a holding time of 1e15 s is flagged", () => {
    const c = withCall(1e15);
    expect(c.notes.join(" ")).toMatch(/Check the call starting 2026-04-06T22:00:00Z: its holding time of 1\.000e\+15 s .* longer than 24 h and alone makes up 100 %/);
  });

  it("a 2 h call in a busy hour of about 20 erl is a small share and not flagged; without it nothing is flagged", () => {
    // 2 erlang-hours / 2 days = 1 erl, about 5 % of the busy hour (< 10 %); on 2 erl it would be half and is flagged
    const big = poisson(t0, 48, 600, 120, "big");
    const rows = [...big];
    rows.splice(rows.findIndex((r) => r[0] > t0 + 3 * HOUR), 0, [t0 + 3 * HOUR, 7200, 0]);
    const c = characterise(records(rows), { fit: { replicates: 0 } });
    expect(c.busyHour.meanTraffic).toBeGreaterThan(15);
    expect(c.notes.join(" ")).not.toMatch(/Check the call/);
    rows.length = 0;
    rows.push(...base);
    rows.splice(rows.findIndex((r) => r[0] > t0 + 3 * HOUR), 0, [t0 + 3 * HOUR, 7200, 0]);
    expect(characterise(records(rows), { fit: { replicates: 0 } }).notes.join(" ")).toMatch(/Check the call starting 2026-04-06T03:00:00Z: its holding time of 7200 s \(2\.0 h\) alone makes up/);
    expect(characterise(records(base), { fit: { replicates: 0 } }).notes.join(" ")).not.toMatch(/Check the call/);
  });
});

describe("data limitations are input errors with a clear message", () => {
  const t = Date.UTC(2026, 2, 2, 10);
  const refusal = (f: () => unknown) => {
    try {
      f();
    } catch (error) {
      expect(error).toBeInstanceOf(MeasurementInputError);
      return error as MeasurementInputError;
    }
    throw new Error("expected a refusal");
  };

  it("one record covers no complete clock hour", () => {
    const e = refusal(() => characterise(records([[t, 120]])));
    expect(e.code).toBe("no-data");
    expect(e.message).toMatch(/covers no complete clock hour/);
  });

  it("no answered calls", () => {
    const e = refusal(() => characterise(records([[t, 0], [t + HOUR * 2, 0]], [1, 2])));
    expect(e.message).toMatch(/no answered calls/);
  });

  it("a group the file does not have", () => {
    const e = refusal(() => characterise({ ...records([[t, 60], [t + 2 * HOUR, 60]]), hasGroup: true, groups: ["north"] }, { group: "south" }));
    expect(e.message).toMatch(/no group "south" in the file; its groups are "north"/);
  });
});

describe("a daylight-saving change (+01:00 until 2026-03-29T01:00Z, then +02:00)", () => {
  const change = Date.UTC(2026, 2, 29, 1);
  const rows = poisson(Date.UTC(2026, 2, 26, 23), 96, 120, 120, "dst").map(([t, d]) => [t, d, t < change ? 60 : 120] as [number, number, number]);
  const c = characterise(records(rows), { fit: { replicates: 0 } });

  it("labels the period's ends on their own records' clocks", () => {
    const last = rows[rows.length - 1];
    expect(c.period.last).toBe(formatLocal(last[0], 120));
    expect(c.period.last).toMatch(/\+02:00$/);
    expect(c.period.first).toMatch(/^2026-03-27T00:.*\+01:00$/);
  });

  it("gives each interval the instant of its local start on the clock in force", () => {
    const perDay = 96;
    // local 2026-03-30 00:00 (+02:00) is 2026-03-29T22:00Z; local 03-29 01:45 (+01:00) is 00:45Z; 03:00 (+02:00) is 01:00Z
    expect(c.series.start[3 * perDay]).toBe(Date.UTC(2026, 2, 29, 22));
    expect(c.series.start[2 * perDay + 7]).toBe(Date.UTC(2026, 2, 29, 0, 45));
    expect(c.series.start[2 * perDay + 12]).toBe(Date.UTC(2026, 2, 29, 1));
    // every record lies in the interval it is counted in
    const day0 = Date.UTC(2026, 2, 27);
    for (const [t, , o] of rows) {
      const k = Math.floor((t + o * 60_000 - day0) / (15 * 60_000));
      expect(t).toBeGreaterThanOrEqual(c.series.start[k]);
      expect(t).toBeLessThan(c.series.start[k] + 15 * 60_000);
    }
  });
});

describe("interarrival scv when every busy-hour gap is 0", () => {
  it("is undefined (null), said in a note, and no NaN appears", () => {
    const t = Date.UTC(2026, 2, 2, 10);
    const c = characterise(records([1, 2, 3, 4, 5].map((i) => [t, i * 60] as [number, number]).concat([[t + 1.5 * HOUR, 60]])), { fit: { replicates: 0 } });
    expect(c.busy.interarrivals).toBe(4);
    expect(c.busy.interarrivalScv).toBeNull();
    expect(c.notes.join(" ")).toMatch(/interarrival scv is undefined \(all gaps are 0\)/);
    expect(JSON.stringify(c.notes)).not.toMatch(/NaN/);
  });
});

describe("what reading the file noticed reaches the characterisation's notes", () => {
  it("the note on repeated rows comes first, for call records", () => {
    const t0 = Date.UTC(2026, 3, 6);
    const data = { ...records(poisson(t0, 3, 120, 100, "notes")), notes: ["2 rows repeat an earlier row (a test note)."] };
    const c = characterise(data, { fit: { replicates: 0 } });
    expect(c.notes[0]).toBe("2 rows repeat an earlier row (a test note).");
  });
});
