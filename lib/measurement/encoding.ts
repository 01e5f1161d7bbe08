import { MeasurementInputError } from "./errors";

/**
 * Streaming UTF-8 check and decode. TextDecoder's fatal mode says only that a file is not
 * UTF-8; this walks the bytes (RFC 3629, table 3-7 of The Unicode Standard for the
 * well-formed ranges) so the message can name the line and byte. A UTF-8 byte-order mark is
 * dropped; a UTF-16 or UTF-32 one, or a NUL byte (UTF-16 text without a mark), is refused.
 */
export class Utf8Decoder {
  private readonly decoder = new TextDecoder("utf-8");
  /** bytes of the sequence still open at the end of the last chunk */
  private need = 0;
  private lo = 0x80;
  private hi = 0xbf;
  private line = 1;
  /** the last byte was CR: an LF after it ends the same line */
  private afterCR = false;
  private first = true;
  bytes = 0;

  constructor(private readonly maxBytes: number) {}

  /** Checks and decodes one chunk; throws MeasurementInputError naming the line. */
  push(chunk: Uint8Array): string {
    this.bytes += chunk.length;
    if (this.bytes > this.maxBytes) throw tooLarge(this.maxBytes);
    let start = 0;
    if (this.first && chunk.length > 0) {
      this.first = false;
      refuseOtherByteOrderMarks(chunk);
      if (chunk[0] === 0xef && chunk[1] === 0xbb && chunk[2] === 0xbf) start = 3;
    }
    for (let i = start; i < chunk.length; i++) this.check(chunk[i]);
    return this.decoder.decode(start ? chunk.subarray(start) : chunk, { stream: true });
  }

  end(): string {
    if (this.need > 0) throw encodingError(this.line, "ends inside a multi-byte character");
    return this.decoder.decode();
  }

  private check(b: number): void {
    if (this.need > 0) {
      if (b < this.lo || b > this.hi) throw encodingError(this.line, `has the byte 0x${hex(b)} where a UTF-8 continuation byte belongs`);
      this.need--;
      this.lo = 0x80;
      this.hi = 0xbf;
      return;
    }
    if (b === 0x0d || (b === 0x0a && !this.afterCR)) this.line++;
    this.afterCR = b === 0x0d;
    if (b === 0x00) throw encodingError(this.line, "contains a NUL byte: the file looks like UTF-16 or binary data");
    if (b < 0x80) return;
    if (b >= 0xc2 && b <= 0xdf) this.need = 1;
    else if (b === 0xe0) [this.need, this.lo] = [2, 0xa0];
    else if (b === 0xed) [this.need, this.hi] = [2, 0x9f];
    else if (b >= 0xe1 && b <= 0xef) this.need = 2;
    else if (b === 0xf0) [this.need, this.lo] = [3, 0x90];
    else if (b >= 0xf1 && b <= 0xf3) this.need = 3;
    else if (b === 0xf4) [this.need, this.hi] = [3, 0x8f];
    else throw encodingError(this.line, `has the byte 0x${hex(b)}, which never occurs in UTF-8 (Latin-1 or Windows-1252 text?)`);
  }
}

const hex = (b: number) => b.toString(16).toUpperCase().padStart(2, "0");

function refuseOtherByteOrderMarks(c: Uint8Array): void {
  const name =
    c[0] === 0xff && c[1] === 0xfe ? (c[2] === 0 && c[3] === 0 ? "UTF-32LE" : "UTF-16LE") : c[0] === 0xfe && c[1] === 0xff ? "UTF-16BE" : c[0] === 0 && c[1] === 0 && c[2] === 0xfe && c[3] === 0xff ? "UTF-32BE" : null;
  if (name) throw new MeasurementInputError("wrong-encoding", `line 1: the file is ${name} (it starts with that byte-order mark); save it as UTF-8`, 1);
}

function encodingError(line: number, what: string): MeasurementInputError {
  return new MeasurementInputError("wrong-encoding", `line ${line}: not UTF-8 text: the line ${what}; save the file as UTF-8`, line);
}

export function tooLarge(maxBytes: number): MeasurementInputError {
  return new MeasurementInputError("file-too-large", `the file is larger than the limit of ${formatBytes(maxBytes)}; split it or upload interval counts instead`);
}

/** Binary units, named as such (IEC 80000-13): 4 000 000 bytes is "3.81 MiB", 2 048 bytes "2 KiB". */
export function formatBytes(n: number): string {
  return n >= 1024 * 1024 ? `${Number((n / 1024 / 1024).toPrecision(3))} MiB` : n >= 1024 ? `${Number((n / 1024).toPrecision(3))} KiB` : `${n} bytes`;
}
