// One-dimensional PostgreSQL arrays in their binary form (array_send/array_recv), both ways. The worker
// moves whole columns of a batch this way: PostgreSQL turning 25 000 floats, uuids and times into text
// and back cost more than the statements that use them.

export type BinaryType = "float8" | "int8" | "int4" | "int2" | "bool" | "uuid" | "timestamptz" | "text" | "bytea";

const ELEMENT_OID: Record<BinaryType, number> = { float8: 701, int8: 20, int4: 23, int2: 21, bool: 16, uuid: 2950, timestamptz: 1184, text: 25, bytea: 17 };
type Variable = "text" | "bytea";
const ELEMENT_SIZE: Record<Exclude<BinaryType, Variable>, number> = { float8: 8, int8: 8, int4: 4, int2: 2, bool: 1, uuid: 16, timestamptz: 8 };
// Binary timestamps count microseconds from 2000-01-01 00:00 UTC.
const PG_EPOCH_MICROS = 946_684_800_000_000;
const TWO_32 = 4_294_967_296;

function writeInt64(buf: Buffer, value: number, offset: number): void {
  if (Number.isSafeInteger(value) && value >= 0) {
    buf.writeUInt32BE(Math.floor(value / TWO_32), offset);
    buf.writeUInt32BE(value % TWO_32, offset + 4);
  } else {
    buf.writeBigInt64BE(BigInt(Math.trunc(value)), offset);
  }
}

function readInt64(buf: Buffer, offset: number): number {
  const hi = buf.readInt32BE(offset);
  const lo = buf.readUInt32BE(offset + 4);
  return hi * TWO_32 + lo;
}

/** The binary array of the values; timestamptz values are microseconds since 1970. Non-finite floats are NULL. */
export function binaryArray(values: readonly unknown[], type: BinaryType): Buffer {
  return binaryColumn(values, (v) => v, type);
}

/** The binary array of one column of the rows, read with `value`, without an intermediate array of the values. */
export function binaryColumn<R>(rows: readonly R[], value: (row: R) => unknown, type: BinaryType): Buffer {
  if (type === "text" || type === "bytea") return variableColumn(rows, value, type);
  const writer = new ColumnWriter(type, rows.length);
  const push = elementWriter(writer, type);
  for (let i = 0; i < rows.length; i++) push(value(rows[i]) ?? null);
  return writer.finish();
}

function elementWriter(w: ColumnWriter, type: Exclude<BinaryType, Variable>): (v: unknown) => void {
  switch (type) {
    case "float8":
      return (v) => w.float8(v as number | null);
    case "int8":
      return (v) => w.int8(v as number | null);
    case "int4":
      return (v) => w.int4(v as number | null);
    case "int2":
      return (v) => w.int2(v as number | null);
    case "timestamptz":
      return (v) => w.timestamptz(v as number | null);
    case "bool":
      return (v) => w.bool(v === null ? null : Boolean(v));
    case "uuid":
      return (v) => w.uuid(v as string | null);
  }
}

/** Text or bytea elements: sized in a first pass over the rows (`value` is called twice a row), written in a second. */
function variableColumn<R>(rows: readonly R[], value: (row: R) => unknown, type: Variable): Buffer {
  // Text columns repeat a handful of values (statuses, sources): each is encoded once.
  const encoded = new Map<unknown, Buffer>();
  const bytesOf = (v: unknown): Buffer => {
    if (Buffer.isBuffer(v)) return v;
    let bytes = encoded.get(v);
    if (!bytes) {
      bytes = Buffer.from(String(v), "utf8");
      encoded.set(v, bytes);
    }
    return bytes;
  };
  let payload = 0;
  let present = 0;
  for (let i = 0; i < rows.length; i++) {
    const v = value(rows[i]);
    if (v === null || v === undefined) continue;
    present++;
    payload += bytesOf(v).length;
  }
  const header = rows.length ? 20 : 12;
  const buf = Buffer.allocUnsafe(header + rows.length * 4 + payload);
  buf.writeInt32BE(rows.length ? 1 : 0, 0);
  buf.writeInt32BE(present < rows.length ? 1 : 0, 4);
  buf.writeInt32BE(ELEMENT_OID[type], 8);
  if (rows.length) {
    buf.writeInt32BE(rows.length, 12);
    buf.writeInt32BE(1, 16);
  }
  let o = header;
  for (let i = 0; i < rows.length; i++) {
    const v = value(rows[i]);
    if (v === null || v === undefined) {
      buf.writeInt32BE(-1, o);
      o += 4;
      continue;
    }
    const bytes = bytesOf(v);
    buf.writeInt32BE(bytes.length, o);
    o += 4;
    // Statuses and sources are a few bytes long: copied by hand, faster than Buffer.copy.
    if (bytes.length <= 32) for (let k = 0; k < bytes.length; k++) buf[o + k] = bytes[k];
    else bytes.copy(buf, o);
    o += bytes.length;
  }
  return buf;
}

/**
 * Writes one fixed-width column of a known number of rows element by element, for hot loops that
 * fill several columns in one pass over the rows (a getter per column and element costs more).
 */
export class ColumnWriter {
  private readonly buf: Buffer;
  private o = 20;
  private count = 0;
  private nulls = false;
  private readonly uuids: Map<string, Buffer> | null;

  constructor(
    private readonly type: Exclude<BinaryType, Variable>,
    capacity: number,
  ) {
    this.buf = Buffer.allocUnsafe(20 + capacity * (4 + ELEMENT_SIZE[type]));
    this.uuids = type === "uuid" ? new Map() : null;
  }

  private element(size: number): number {
    this.buf.writeInt32BE(size, this.o);
    const at = this.o + 4;
    this.o = at + size;
    this.count++;
    return at;
  }

  null(): void {
    this.buf.writeInt32BE(-1, this.o);
    this.o += 4;
    this.count++;
    this.nulls = true;
  }

  // One method per element type: the caller knows the column's type, and a switch per element costs.

  /** A float8 element; null and non-finite values are NULL. */
  float8(v: number | null): void {
    if (v === null || !Number.isFinite(v)) return this.null();
    this.buf.writeDoubleBE(v, this.element(8));
  }

  int8(v: number | null): void {
    if (v === null) return this.null();
    writeInt64(this.buf, v, this.element(8));
  }

  /** A timestamptz element from microseconds since 1970. */
  timestamptz(micros: number | null): void {
    if (micros === null) return this.null();
    writeInt64(this.buf, micros - PG_EPOCH_MICROS, this.element(8));
  }

  int4(v: number | null): void {
    if (v === null) return this.null();
    this.buf.writeInt32BE(v, this.element(4));
  }

  int2(v: number | null): void {
    if (v === null) return this.null();
    this.buf.writeInt16BE(v, this.element(2));
  }

  bool(v: boolean | null): void {
    if (v === null) return this.null();
    this.buf[this.element(1)] = v ? 1 : 0;
  }

  uuid(v: string | null): void {
    if (v === null) return this.null();
    let raw = this.uuids!.get(v);
    if (!raw) {
      raw = Buffer.from(v.replace(/-/g, ""), "hex");
      this.uuids!.set(v, raw);
    }
    const at = this.element(16);
    // Sixteen bytes are copied faster by hand than by Buffer.copy.
    for (let i = 0; i < 16; i++) this.buf[at + i] = raw[i];
  }

  /** The array of everything written. */
  finish(): Buffer {
    if (this.count === 0) {
      const empty = Buffer.alloc(12);
      empty.writeInt32BE(ELEMENT_OID[this.type], 8);
      return empty;
    }
    this.buf.writeInt32BE(1, 0);
    this.buf.writeInt32BE(this.nulls ? 1 : 0, 4);
    this.buf.writeInt32BE(ELEMENT_OID[this.type], 8);
    this.buf.writeInt32BE(this.count, 12);
    this.buf.writeInt32BE(1, 16);
    return this.buf.subarray(0, this.o);
  }
}

function formatUuid(hex: string): string {
  return `${hex.slice(0, 8)}-${hex.slice(8, 12)}-${hex.slice(12, 16)}-${hex.slice(16, 20)}-${hex.slice(20)}`;
}

type Decoded<T extends BinaryType> = T extends "uuid" | "text" ? string : T extends "bytea" ? Buffer : T extends "bool" ? boolean : number;

/**
 * The elements of a one-dimensional binary array (NULL elements as null); timestamptz as microseconds
 * since 1970, int8 as a number (exact below 2^53). A NULL array reads as empty.
 */
export function decodeBinaryArray<T extends BinaryType>(buf: Buffer | null, type: T): (Decoded<T> | null)[] {
  if (buf === null || buf.length < 12) return [];
  const ndim = buf.readInt32BE(0);
  if (ndim === 0) return [];
  if (ndim !== 1) throw new Error(`expected a one-dimensional array, got ${ndim} dimensions`);
  const oid = buf.readInt32BE(8);
  if (oid !== ELEMENT_OID[type]) throw new Error(`expected ${type} elements (oid ${ELEMENT_OID[type]}), got oid ${oid}`);
  const n = buf.readInt32BE(12);
  const out = new Array<Decoded<T> | null>(n);
  const uuids = type === "uuid" ? new Map<string, string>() : null;
  let o = 20;
  for (let i = 0; i < n; i++) {
    const len = buf.readInt32BE(o);
    o += 4;
    if (len === -1) {
      out[i] = null;
      continue;
    }
    let value: unknown;
    switch (type) {
      case "float8":
        value = buf.readDoubleBE(o);
        break;
      case "int8":
        value = readInt64(buf, o);
        break;
      case "timestamptz":
        value = readInt64(buf, o) + PG_EPOCH_MICROS;
        break;
      case "int4":
        value = buf.readInt32BE(o);
        break;
      case "int2":
        value = buf.readInt16BE(o);
        break;
      case "bool":
        value = buf[o] !== 0;
        break;
      case "text":
        value = buf.toString("utf8", o, o + len);
        break;
      case "bytea":
        value = buf.subarray(o, o + len);
        break;
      case "uuid": {
        const hex = buf.toString("hex", o, o + 16);
        let text = uuids!.get(hex);
        if (text === undefined) {
          text = formatUuid(hex);
          uuids!.set(hex, text);
        }
        value = text;
        break;
      }
    }
    out[i] = value as Decoded<T>;
    o += len;
  }
  return out;
}

/**
 * SQL for an array expression's binary form, base64-encoded: the driver reads every result value as
 * UTF-8 text, which would mangle raw bytes, and base64 costs PostgreSQL far less than formatting the
 * elements as text.
 */
export const sendArray = (expression: string) => `encode(array_send(${expression}), 'base64')`;

/** A row of base64-encoded `sendArray(…)` columns as binary arrays (null stays null). */
export function decodeBase64Row(row: Record<string, string | null>): Record<string, Buffer | null> {
  const out: Record<string, Buffer | null> = {};
  for (const [key, value] of Object.entries(row)) out[key] = value === null ? null : Buffer.from(value, "base64");
  return out;
}
