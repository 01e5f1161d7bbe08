import { describe, expect, it } from "vitest";
import { readMeasurementCsv, MeasurementInputError, type ColumnMappingInput } from "../../../lib/measurement";

const calls: ColumnMappingInput = { kind: "call-records", start: "start", duration: "duration", outcome: "outcome", group: "route" };
const counts: ColumnMappingInput = { kind: "interval-counts", intervalStart: "interval", attempts: "attempts", carried: "carried", intervalMinutes: 15 };
const enc = (s: string) => new TextEncoder().encode(s);

async function refusal(input: Uint8Array | string, mapping: ColumnMappingInput = calls, maxBytes?: number): Promise<MeasurementInputError> {
  try {
    await readMeasurementCsv(typeof input === "string" ? enc(input) : input, mapping, { maxBytes });
  } catch (e) {
    if (e instanceof MeasurementInputError) return e;
    throw e;
  }
  throw new Error("the file was accepted");
}

const header = "start,duration,outcome,route\n";
const ok1 = "2026-01-12T10:00:00+01:00,30,answered,north\n";
const ok2 = "2026-01-12T10:00:05+01:00,40,answered,south\n";

describe("every bad call-record file is refused with its line and column", () => {
  const cases: Array<[string, string, string, number | undefined, string | undefined, RegExp]> = [
    ["missing column", "start,length,outcome,route\n" + ok1, "missing-column", 1, "duration", /no column "duration".*"start", "length", "outcome", "route"/],
    ["duplicate column", "start,duration,duration,outcome,route\n", "duplicate-column", 1, "duration", /names the column "duration" twice/],
    ["wrong field count", header + ok1 + "2026-01-12T10:00:05+01:00,40,answered\n", "wrong-field-count", 3, undefined, /line 3: has 3 fields, the header has 4/],
    ["non-numeric duration", header + ok1 + "2026-01-12T10:00:05+01:00,4O,answered,north\n", "not-a-number", 3, "duration", /line 3, column "duration": "4O" is not a number/],
    ["empty duration of an answered call", header + "2026-01-12T10:00:05+01:00,,answered,north\n", "not-a-number", 2, "duration", /is empty/],
    ["negative duration", header + ok1 + ok2 + "2026-01-12T10:00:09+01:00,-12.5,answered,north\n", "negative-duration", 4, "duration", /-12.5 is negative/],
    ["negative clock duration", header + "2026-01-12T10:00:09+01:00,-0:02:10,answered,north\n", "negative-duration", 2, "duration", /negative/],
    ["unparseable timestamp", header + ok1 + "12/01/2026 10:00,30,answered,north\n", "bad-timestamp", 3, "start", /"12\/01\/2026 10:00" is not a timestamp/],
    ["impossible date", header + "2026-02-30T10:00:00+01:00,30,answered,north\n", "bad-timestamp", 2, "start", /day 30/],
    ["offset out of range", header + "2026-01-12T10:00:00+15:00,30,answered,north\n", "bad-timestamp", 2, "start", /offset/],
    ["offset on some rows only", header + ok1 + "2026-01-12 10:00:05,30,answered,north\n", "mixed-time-zones", 3, "start", /has no UTC offset but the one on line 2 has one/],
    ["two unrelated offsets", header + ok1 + "2026-01-12T10:00:05-05:00,30,answered,north\n", "mixed-time-zones", 3, "start", /mixed time zones.*-05:00.*\+01:00 \(line 2\)/],
    ["unsorted rows", header + ok2 + ok1, "unsorted", 3, "start", /earlier than 2026-01-12T10:00:05\+01:00 on line 2; sort the file by start/],
    ["duplicate row", header + ok1 + ok1, "duplicate-row", 3, undefined, /line 3: repeats line 2/],
    ["duplicate after another call at the same instant", header + ok1 + "2026-01-12T10:00:00+01:00,31,answered,north\n" + ok1, "duplicate-row", 4, undefined, /repeats line 2/],
    ["unknown outcome", header + "2026-01-12T10:00:00+01:00,30,busy,north\n", "bad-outcome", 2, "outcome", /"busy" is not one of answered, blocked, abandoned/],
    ["unclosed quote", header + ok1 + '"2026-01-12T10:00:05+01:00,30,answered,north\n', "unclosed-quote", 3, undefined, /never closed/],
    ["header only", header, "no-data", 2, undefined, /header but no data rows/],
    ["blank lines only", "\n\n\n", "empty-file", undefined, undefined, /empty/],
  ];
  for (const [name, text, code, line, column, message] of cases)
    it(name, async () => {
      const e = await refusal(text);
      expect(e.code).toBe(code);
      expect(e.line).toBe(line);
      expect(e.column).toBe(column);
      expect(e.message).toMatch(message);
    });

  it("empty file (0 bytes)", async () => {
    const e = await refusal(new Uint8Array(0));
    expect(e.code).toBe("empty-file");
  });

  it("oversize file: refused as soon as the limit is passed, naming the limit", async () => {
    const body = header + Array.from({ length: 200 }, (_, i) => `2026-01-12T10:${String(Math.floor(i / 60)).padStart(2, "0")}:${String(i % 60).padStart(2, "0")}+01:00,30,answered,north\n`).join("");
    const e = await refusal(body, calls, 2048);
    expect(e.code).toBe("file-too-large");
    expect(e.message).toMatch(/larger than the limit of 2 kB/);
  });

  it("more than the allowed number of groups", async () => {
    const rows = Array.from({ length: 202 }, (_, i) => `2026-01-12T10:00:${String(Math.floor(i / 4)).padStart(2, "0")}+01:00,${i},answered,r${i}\n`).join("");
    const e = await refusal(header + rows);
    expect(e.code).toBe("too-many-groups");
    expect(e.line).toBe(202);
  });
});

describe("wrong encoding is refused with the line", () => {
  it("Latin-1 byte (ü as 0xFC) on line 3", async () => {
    const bytes = new Uint8Array([...enc(header + ok1 + "2026-01-12T10:00:05+01:00,40,answered,M"), 0xfc, ...enc("nster\n")]);
    const e = await refusal(bytes);
    expect(e.code).toBe("wrong-encoding");
    expect(e.line).toBe(3);
    expect(e.message).toMatch(/line 3: not UTF-8 text.*0xFC/);
  });
  it("UTF-16 byte-order mark", async () => {
    const e = await refusal(new Uint8Array([0xff, 0xfe, 0x73, 0x00, 0x74, 0x00]));
    expect(e.message).toMatch(/UTF-16LE/);
    expect(e.line).toBe(1);
  });
  it("UTF-16 without a mark (NUL bytes)", async () => {
    const e = await refusal(new Uint8Array([0x73, 0x00, 0x74, 0x00]));
    expect(e.message).toMatch(/NUL byte/);
  });
  it("overlong encoding (0xC0 0xAF) and a surrogate (0xED 0xA0 0x80) are not UTF-8", async () => {
    for (const bad of [[0xc0, 0xaf], [0xed, 0xa0, 0x80]]) {
      const e = await refusal(new Uint8Array([...enc(header), ...bad, 0x0a]));
      expect(e.code).toBe("wrong-encoding");
      expect(e.line).toBe(2);
    }
  });
  it("a file cut inside a multi-byte character", async () => {
    const e = await refusal(new Uint8Array([...enc(header + ok1 + "x"), 0xe2, 0x82]));
    expect(e.message).toMatch(/ends inside a multi-byte character/);
  });
});

describe("bad interval-count files", () => {
  const h = "interval,attempts,carried\n";
  const cases: Array<[string, string, string, number, RegExp]> = [
    ["fractional count", h + "2026-01-12T10:00:00Z,12.5,10\n", "bad-count", 2, /12.5 is not a whole number/],
    ["negative count", h + "2026-01-12T10:00:00Z,-3,0\n", "bad-count", 2, /-3 is not a whole number/],
    ["carried above attempts", h + "2026-01-12T10:00:00Z,12,13\n", "bad-count", 2, /13 calls carried is more than the 12 attempts/],
    ["off the interval grid", h + "2026-01-12T10:07:00Z,12,10\n", "bad-timestamp", 2, /not on the 15-minute grid/],
    ["repeated interval", h + "2026-01-12T10:00:00Z,12,10\n2026-01-12T10:00:00Z,11,10\n", "duplicate-row", 3, /repeats the interval start of line 2/],
    ["unsorted intervals", h + "2026-01-12T10:15:00Z,12,10\n2026-01-12T10:00:00Z,11,10\n", "unsorted", 3, /earlier than/],
  ];
  for (const [name, text, code, line, message] of cases)
    it(name, async () => {
      const e = await refusal(text, counts);
      expect(e.code).toBe(code);
      expect(e.line).toBe(line);
      expect(e.message).toMatch(message);
    });
});

describe("the mapping itself is checked by its schema", () => {
  it("a column mapped twice, an unknown kind, a bad interval length", async () => {
    await expect(readMeasurementCsv(enc(header + ok1), { kind: "call-records", start: "start", duration: "Start" })).rejects.toThrow(/mapping duration: the column "Start" is already mapped to start/);
    await expect(readMeasurementCsv(enc(header + ok1), { kind: "cdr" } as never)).rejects.toThrow(/mapping kind/);
    await expect(readMeasurementCsv(enc(header + ok1), { ...counts, intervalMinutes: 7 } as never)).rejects.toThrow(/intervalMinutes: must be 5, 10, 15, 20, 30 or 60/);
    await expect(readMeasurementCsv(enc(header + ok1), { ...calls, timeZone: "CET" } as never)).rejects.toThrow(/timeZone/);
  });
});
