import { describe, expect, it } from "vitest";
import { formatBytes, MAX_FILE_BYTES, readMeasurementCsv, MeasurementInputError, type CallRecordSet, type ColumnMappingInput, type IntervalCountSet } from "../../../lib/measurement";

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
    ["infinite duration (1e400)", header + ok1 + "2026-01-12T10:00:09+01:00,1e400,answered,north\n", "not-a-number", 3, "duration", /^line 3, column "duration": "1e400" is not a finite number/],
    ["Infinity as a duration", header + "2026-01-12T10:00:09+01:00,Infinity,answered,north\n", "not-a-number", 2, "duration", /^line 2, column "duration": "Infinity" is not a finite number/],
    ["NaN as a duration", header + ok1 + ok2 + "2026-01-12T10:00:09+01:00,-nan,answered,north\n", "not-a-number", 4, "duration", /^line 4, column "duration": "-nan" is not a finite number/],
    ["a clock duration too long to hold", header + `2026-01-12T10:00:09+01:00,${"9".repeat(400)}:00:00,answered,north\n`, "not-a-number", 2, "duration", /^line 2, column "duration": "9+:00:00" is not a finite number/],
    ["a tiny negative that reads as -0 is still negative", header + "2026-01-12T10:00:09+01:00,-1e-400,answered,north\n", "negative-duration", 2, "duration", /^line 2, column "duration": -1e-400 is negative/],
    ["negative fraction of a second", header + "2026-01-12T10:00:09+01:00,-0.5,answered,north\n", "negative-duration", 2, "duration", /-0.5 is negative/],
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

  it("oversize file: refused as soon as the limit is passed, naming the limit in the binary unit it is", async () => {
    const body = header + Array.from({ length: 200 }, (_, i) => `2026-01-12T10:${String(Math.floor(i / 60)).padStart(2, "0")}:${String(i % 60).padStart(2, "0")}+01:00,30,answered,north\n`).join("");
    const e = await refusal(body, calls, 2048);
    expect(e.code).toBe("file-too-large");
    expect(e.message).toMatch(/larger than the limit of 2 KiB;/);
    expect((await refusal(body, calls, 4_000_000 / 1000)).message).toMatch(/limit of 3.91 KiB;/);
    expect(formatBytes(4_000_000)).toBe("3.81 MiB");
    expect(formatBytes(MAX_FILE_BYTES)).toBe("20 MiB");
    expect(formatBytes(1000)).toBe("1000 bytes");
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
    ["a count too large to be finite", h + "2026-01-12T10:00:00Z,12,10\n2026-01-12T10:15:00Z,1e400,10\n", "not-a-number", 3, /^line 3, column "attempts": "1e400" is not a finite number/],
    ["a count written with a decimal comma", h + "2026-01-12T10:00:00Z,\"12,0\",10\n", "not-a-number", 2, /^line 2, column "attempts": "12,0" is not a number: a comma is read neither as a decimal mark nor as a thousands separator/],
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

describe("rows repeating an earlier row at the same start are kept, with a note", () => {
  it("two identical rows are two calls, counted in the read result's notes", async () => {
    const d = (await readMeasurementCsv(enc(header + ok1 + ok1 + ok2), calls)) as CallRecordSet;
    expect(d.count).toBe(3);
    expect(d.notes).toHaveLength(1);
    expect(d.notes![0]).toMatch(/^1 row repeats an earlier row with the same start in every mapped column \(33 % of the rows; the first is line 3, repeating line 2\)\./);
    expect(d.notes![0]).toMatch(/If the export really wrote some calls twice, remove the repeated rows and upload the file again\.$/);
  });
  it("a repeat after another call at the same instant counts too; different groups or outcomes are no repeat", async () => {
    const other = "2026-01-12T10:00:00+01:00,31,answered,north\n";
    const d = (await readMeasurementCsv(enc(header + ok1 + other + ok1 + other + "2026-01-12T10:00:00+01:00,30,answered,south\n" + "2026-01-12T10:00:00+01:00,30,blocked,north\n"), calls)) as CallRecordSet;
    expect(d.count).toBe(6);
    expect(d.notes![0]).toMatch(/^2 rows repeat .* the first is line 4, repeating line 2\)/);
  });
  it("no note when nothing repeats", async () => {
    const d = await readMeasurementCsv(enc(header + ok1 + ok2), calls);
    expect(d.notes).toEqual([]);
  });
  it("interval counts with the same interval start twice stay refused", async () => {
    const e = await refusal("interval,attempts,carried\n2026-01-12T10:00:00Z,12,10\n2026-01-12T10:00:00Z,12,10\n", counts);
    expect([e.code, e.line, e.column]).toEqual(["duplicate-row", 3, "interval"]);
    expect(e.message).toBe('line 3, column "interval": repeats the interval start of line 2');
  });
});

describe("minus zero is zero", () => {
  it("durations -0, -0.0, -0e3 and -0:00:00 read as 0 (not -0)", async () => {
    const rows = ["-0", "-0.0", "-0e3", "-0:00:00", "-00:00"].map((v, i) => `2026-01-12T10:00:0${i}+01:00,${v},answered,north\n`).join("");
    const d = (await readMeasurementCsv(enc(header + rows), calls)) as CallRecordSet;
    expect(Array.from(d.duration).every((x) => Object.is(x, 0))).toBe(true);
    expect(d.count).toBe(5);
  });
  it("a count of -0 is 0", async () => {
    const d = (await readMeasurementCsv(enc("interval,attempts,carried\n2026-01-12T10:00:00Z,-0,-0\n"), counts)) as IntervalCountSet;
    expect(Object.is(d.attempts[0], 0)).toBe(true);
    expect(Object.is(d.carried![0], 0)).toBe(true);
  });
});

describe("decimal commas get a hint, not a guess", () => {
  const semi = { ...calls, delimiter: ";" } as ColumnMappingInput;
  it('"120,5" in a semicolon file: refused at its line and column, suggesting 120.5', async () => {
    const e = await refusal("start;duration;outcome;route\n2026-01-12T10:00:00+01:00;30;answered;north\n2026-01-12T10:00:05+01:00;120,5;answered;north\n", semi);
    expect([e.code, e.line, e.column]).toEqual(["not-a-number", 3, "duration"]);
    expect(e.message).toBe(
      'line 3, column "duration": "120,5" is not a number: a comma is read neither as a decimal mark nor as a thousands separator; write numbers with a decimal point (120.5) and no thousands separators',
    );
  });
  it('"1.234,5" (thousands point, decimal comma) in a tab file: the hint without an example', async () => {
    const e = await refusal("start\tduration\toutcome\troute\n2026-01-12T10:00:00+01:00\t1.234,5\tanswered\tnorth\n");
    expect([e.code, e.line, e.column]).toEqual(["not-a-number", 2, "duration"]);
    expect(e.message).toMatch(/^line 2, column "duration": "1.234,5" is not a number: a comma is read neither .* decimal point and no thousands separators$/);
  });
  it("other text keeps the plain message", async () => {
    const e = await refusal(header + "2026-01-12T10:00:00+01:00,\"12,x\",answered,north\n");
    expect(e.message).toBe('line 2, column "duration": "12,x" is not a number');
  });
});

describe("line numbers with quoted line breaks of another style than the file's", () => {
  const mapped = { kind: "call-records", start: "start", duration: "duration", group: "route" } as const;
  // each file: header (1), a record whose quoted route spans lines 2-3, a good record (4), a bad one (5)
  const files: Array<[string, string, string]> = [
    ["CRLF file, bare LF inside quotes", "\r\n", "\n"],
    ["LF file, CRLF inside quotes", "\n", "\r\n"],
    ["CR file, LF inside quotes", "\r", "\n"],
    ["CR file, CRLF inside quotes", "\r", "\r\n"],
    ["CRLF file, bare CR inside quotes", "\r\n", "\r"],
    ["LF file, bare CR inside quotes", "\n", "\r"],
  ];
  for (const [name, eol, inner] of files)
    it(name, async () => {
      const text = `start,duration,route${eol}2026-03-02 10:00:00,1,"a${inner}b"${eol}2026-03-02 10:00:01,2,r${eol}2026-03-02 10:00:02,x,r${eol}`;
      for (const source of [enc(text), (async function* () { for (const b of enc(text)) yield new Uint8Array([b]); })()]) {
        const e = await refusal(source as Uint8Array, mapped);
        expect([e.code, e.line, e.column]).toEqual(["not-a-number", 5, "duration"]);
        expect(e.message).toBe('line 5, column "duration": "x" is not a number');
      }
    });
  it("a wrong byte in a CR-only file is named on its line", async () => {
    const bytes = new Uint8Array([...enc("start,duration,route\r2026-03-02 10:00:00,1,r\r2026-03-02 10:00:01,2,Z"), 0xfc, ...enc("\r")]);
    const e = await refusal(bytes, mapped);
    expect([e.code, e.line]).toEqual(["wrong-encoding", 3]);
    expect(e.message).toMatch(/^line 3: not UTF-8 text/);
  });
});

describe("a local-time file crossing the end of daylight saving", () => {
  const plain = { kind: "call-records", start: "start", duration: "duration" } as const;
  it("a step back of under an hour at night names the clock change and asks for UTC offsets", async () => {
    const e = await refusal("start,duration\n2026-10-25 02:40:00,60\n2026-10-25 02:55:00,60\n2026-10-25 02:05:00,60\n2026-10-25 02:20:00,60\n", plain);
    expect([e.code, e.line, e.column]).toEqual(["clock-change", 4, "start"]);
    expect(e.message).toMatch(/^line 4, column "start": 2026-10-25 02:05:00 is earlier than 2026-10-25 02:55:00 on line 3: .*clocks going back at the end of daylight saving/);
    expect(e.message).toMatch(/export the start times with their UTC offset \(such as \+01:00\) or in UTC \(Z\)/);
  });
  it("the same where the clock goes back at midnight, read with a fixed time zone", async () => {
    const e = await refusal("start,duration\n2026-04-04 23:50:00,60\n2026-04-04 23:10:00,60\n", { ...plain, timeZone: "-03:00" });
    expect([e.code, e.line, e.column]).toEqual(["clock-change", 3, "start"]);
  });
  it.each([
    ["in the daytime", "2026-10-25 10:00:05", "2026-10-25 10:00:00"],
    ["more than an hour back at night", "2026-10-25 03:30:00", "2026-10-25 02:20:00"],
    ["from evening to night of the day before", "2026-10-25 01:00:00", "2026-10-24 23:59:00"],
  ])("a genuinely unsorted file (%s) keeps the sort message", async (_, first, second) => {
    const e = await refusal(`start,duration\n${first},60\n${second},60\n`, plain);
    expect([e.code, e.line, e.column]).toEqual(["unsorted", 3, "start"]);
    expect(e.message).toBe(`line 3, column "start": ${second} is earlier than ${first} on line 2; sort the file by start`);
  });
  it("with UTC offsets in the file, a step back is plain unsorted", async () => {
    const e = await refusal("start,duration\n2026-10-25 02:55:00+01:00,60\n2026-10-25 02:05:00+01:00,60\n", plain);
    expect([e.code, e.line]).toEqual(["unsorted", 3]);
    expect(e.message).toMatch(/; sort the file by start$/);
  });
});
