import { describe, expect, it } from "vitest";
import { previewCsv, readMeasurementCsv, type CallRecordSet, type IntervalCountSet } from "../../../lib/measurement";
import { parseTimestamp } from "../../../lib/measurement/timestamps";

const enc = (s: string) => new TextEncoder().encode(s);
async function* pieces(bytes: Uint8Array, cuts: number[]): AsyncGenerator<Uint8Array> {
  let from = 0;
  for (const c of [...cuts, bytes.length]) {
    yield bytes.subarray(from, c);
    from = c;
  }
}

describe("reading call records", () => {
  const text =
    "\uFEFFStart Time;Duration;Result;Trunk Group\r\n" +
    "2026-03-28 23:59:58.5+01:00;0:02:05;answered;\"Süd, Ost\"\r\n" +
    "2026-03-29T01:30:00+01:00;12;blocked;Nord\r\n" +
    "\r\n" +
    "2026-03-29T03:10:00+02:00;;abandoned;\"Nord\r\nWest\"\r\n" +
    "2026-03-29T03:10:01+02:00;1.5e2;ANSWERED;Nord\r\n";
  const mapping = { kind: "call-records", start: "start time", duration: "duration", outcome: "result", group: "trunk group" } as const;

  it("splits at every byte boundary give the same records (UTF-8 characters cut in two included)", async () => {
    const bytes = enc(text);
    const whole = (await readMeasurementCsv(bytes, mapping)) as CallRecordSet;
    expect(whole.count).toBe(4);
    expect(Array.from(whole.duration)).toEqual([125, 12, 0, 150]);
    expect(Array.from(whole.outcome)).toEqual([0, 1, 2, 0]);
    expect(whole.groups).toEqual(["Süd, Ost", "Nord", "Nord\r\nWest"]);
    expect(whole.offsets).toEqual([60, 120]); // one daylight-saving change is allowed
    expect(whole.start[0]).toBe(Date.UTC(2026, 2, 28, 22, 59, 58, 500));
    for (let cut = 1; cut < bytes.length; cut++) {
      const split = (await readMeasurementCsv(pieces(bytes, [cut]), mapping)) as CallRecordSet;
      expect(Array.from(split.start)).toEqual(Array.from(whole.start));
      expect(split.groups).toEqual(whole.groups);
    }
  });

  it("names the right line after a quoted field that spans two lines", async () => {
    const bad = text + "2026-03-29T03:10:02+02:00;x;answered;Nord\r\n";
    // lines: 1 header, 2, 3, 4 blank, 5-6 the two-line record, 7, 8 the bad one
    await expect(readMeasurementCsv(enc(bad), mapping)).rejects.toThrow(/^line 8, column "Duration": "x" is not a number/);
  });

  it("duration units: minutes and milliseconds", async () => {
    const csv = "s,d\n2026-01-12 10:00,2.5\n";
    const minutes = (await readMeasurementCsv(enc(csv), { kind: "call-records", start: "s", duration: "d", durationUnit: "minutes" })) as CallRecordSet;
    expect(minutes.duration[0]).toBe(150);
    const ms = (await readMeasurementCsv(enc(csv), { kind: "call-records", start: "s", duration: "d", durationUnit: "milliseconds" })) as CallRecordSet;
    expect(ms.duration[0]).toBeCloseTo(0.0025, 15);
  });

  it("timestamps without an offset take the mapping's time zone", async () => {
    const d = (await readMeasurementCsv(enc("s,d\n2026-01-12 10:00:00,1\n"), { kind: "call-records", start: "s", duration: "d", timeZone: "-05:30" })) as CallRecordSet;
    expect(d.start[0]).toBe(Date.UTC(2026, 0, 12, 15, 30));
    expect(d.offset[0]).toBe(-330);
  });
});

describe("timestamp forms", () => {
  it.each([
    ["2026-01-12T10:00Z", Date.UTC(2026, 0, 12, 10, 0)],
    ["2026-01-12 10:00:01,250 +0100", Date.UTC(2026, 0, 12, 9, 0, 1, 250)],
    ["2026-01-12T10:00:00-03", Date.UTC(2026, 0, 12, 13, 0)],
    ["2024-02-29T00:00:00Z", Date.UTC(2024, 1, 29)],
  ])("%s", (text, epoch) => {
    const t = parseTimestamp(text, 0);
    expect(typeof t === "string" ? t : t.epochMs).toBe(epoch);
  });
  it.each(["2025-02-29T00:00:00Z", "2026-13-01 00:00", "2026-01-12T24:00", "1768212000", "2026-01-12"])("refuses %s", (text) => {
    expect(typeof parseTimestamp(text, 0)).toBe("string");
  });
});

describe("interval counts", () => {
  it("reads attempts and carried calls", async () => {
    const d = (await readMeasurementCsv(enc("Interval,Attempts,Carried\n2026-01-12T10:00:00Z,12,11\n2026-01-12T10:15:00Z,9,9\n"), {
      kind: "interval-counts",
      intervalStart: "interval",
      attempts: "attempts",
      carried: "carried",
      intervalMinutes: 15,
    })) as IntervalCountSet;
    expect(Array.from(d.attempts)).toEqual([12, 9]);
    expect(Array.from(d.carried!)).toEqual([11, 9]);
  });
});

describe("preview", () => {
  it("returns the header, the first rows with their lines, the delimiter and a guessed mapping, reading no further", async () => {
    const rows = Array.from({ length: 6000 }, (_, i) => `2026-01-12T10:00:${String(i % 60).padStart(2, "0")}Z\t${i + 1}\tanswered`).join("\n");
    // a bad byte ~200 kB on, past the first 64 kB chunk, is never read
    expect(rows.length).toBeGreaterThan(3 * 64 * 1024);
    const bytes = new Uint8Array([...enc(`call start\tholding time\tstatus\n${rows}\n`), 0xff]);
    const p = await previewCsv(bytes, 5);
    expect(p.header).toEqual(["call start", "holding time", "status"]);
    expect(p.rows).toHaveLength(5);
    expect(p.lines).toEqual([2, 3, 4, 5, 6]);
    expect(p.delimiter).toBe("\t");
    expect(p.guess).toEqual({ kind: "call-records", start: "call start", duration: "holding time", outcome: "status" });
  });
  it("guesses a duration column named with its unit, and the unit", async () => {
    const demo = await previewCsv(enc("call_start,duration_s,outcome,route\n2026-01-12T10:00:00Z,155.0,answered,south\n"));
    expect(demo.guess).toEqual({ kind: "call-records", start: "call_start", duration: "duration_s", outcome: "outcome", group: "route" });
    const ms = await previewCsv(enc("start,duration_ms\n2026-01-12T10:00:00Z,1500\n"));
    expect(ms.guess).toEqual({ kind: "call-records", start: "start", duration: "duration_ms", durationUnit: "milliseconds" });
    const min = await previewCsv(enc("start,hold (min)\n2026-01-12T10:00:00Z,2.5\n"));
    expect(min.guess).toEqual({ kind: "call-records", start: "start", duration: "hold (min)", durationUnit: "minutes" });
  });
  it("guesses interval counts", async () => {
    const p = await previewCsv(enc("period_start,calls,answered\n2026-01-12T10:00Z,5,5\n"));
    expect(p.guess).toEqual({ kind: "interval-counts", intervalStart: "period_start", attempts: "calls", carried: "answered", intervalMinutes: 15 });
  });
});
