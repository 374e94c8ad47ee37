import { describe, it, expect } from "vitest";
import { CsvParser, parseCsvText, readCsvStream, CsvStreamError } from "@/lib/csv/parse";
import { csvField, csvRecord, csvStream, attachmentName } from "@/lib/csv/write";
import { mulberry32 } from "./seeded-normal";

const fields = (text: string) => parseCsvText(text).map((r) => r.fields);

function streamOf(chunks: (string | Uint8Array)[]): ReadableStream<Uint8Array> {
  const encoder = new TextEncoder();
  return new ReadableStream({
    start(controller) {
      for (const c of chunks) controller.enqueue(typeof c === "string" ? encoder.encode(c) : c);
      controller.close();
    },
  });
}

async function collect(stream: ReadableStream<Uint8Array>, maxBytes = 1e9) {
  const out = [];
  for await (const r of readCsvStream(stream, { maxBytes })) out.push(r);
  return out;
}

describe("RFC 4180 §2 examples", () => {
  it("splits records on CRLF, with or without a final line break (rules 1–2)", () => {
    expect(fields("aaa,bbb,ccc\r\nzzz,yyy,xxx\r\n")).toEqual([["aaa", "bbb", "ccc"], ["zzz", "yyy", "xxx"]]);
    expect(fields("aaa,bbb,ccc\r\nzzz,yyy,xxx")).toEqual([["aaa", "bbb", "ccc"], ["zzz", "yyy", "xxx"]]);
  });

  it("reads quoted fields, commas and line breaks inside quotes, and doubled quotes (rules 5–7)", () => {
    expect(fields('"aaa","bbb","ccc"\r\nzzz,yyy,xxx')).toEqual([["aaa", "bbb", "ccc"], ["zzz", "yyy", "xxx"]]);
    expect(fields('"aaa","b\r\nbb","ccc"\r\nzzz,yyy,xxx')).toEqual([["aaa", "b\r\nbb", "ccc"], ["zzz", "yyy", "xxx"]]);
    expect(fields('"aaa","b""bb","ccc"')).toEqual([["aaa", 'b"bb', "ccc"]]);
    expect(fields('a,"x,y",')).toEqual([["a", "x,y", ""]]);
  });

  it("accepts bare LF line ends and skips blank lines and a byte-order mark", () => {
    expect(fields("\ufeffat,level_m\n\n2026-01-01T00:00:00Z,1.2\n\n")).toEqual([["at", "level_m"], ["2026-01-01T00:00:00Z", "1.2"]]);
  });
});

describe("line numbers and malformed records", () => {
  it("gives each record the file line it starts on, counting line breaks inside quotes", () => {
    const records = parseCsvText('h1,h2\r\n"multi\r\nline",x\r\n\r\nlast,y\n"a\nb\nc",z');
    expect(records.map((r) => r.line)).toEqual([1, 2, 5, 6]);
  });

  it("flags a stray quote, text after a closing quote and an unclosed quote", () => {
    expect(parseCsvText('a,b"c\n')[0].error).toMatch(/quote inside an unquoted field/);
    expect(parseCsvText('"ab"c,d\n')[0].error).toMatch(/text after a closing quote/);
    const unclosed = parseCsvText('x,y\n"open,field\nmore');
    expect(unclosed[1]).toMatchObject({ line: 2, error: expect.stringMatching(/never closed/) });
  });

  it("gives the same records however the text is cut into chunks", () => {
    const text = 'seq,at,note\r\n1,2026-01-01T00:00:00Z,"said ""hi"",\r\nthen left"\r\n2,2026-01-01T00:01:00Z,plain\n3,x,\r\n';
    const whole = parseCsvText(text);
    const random = mulberry32(11);
    for (let trial = 0; trial < 200; trial++) {
      const parser = new CsvParser();
      const out = [];
      let i = 0;
      while (i < text.length) {
        const n = 1 + Math.floor(random() * 6);
        out.push(...parser.push(text.slice(i, i + n)));
        i += n;
      }
      out.push(...parser.end());
      expect(out).toEqual(whole);
    }
  });
});

describe("reading a byte stream", () => {
  it("decodes UTF-8 split across chunks", async () => {
    const bytes = new TextEncoder().encode("note\nTémpérature élevée\n");
    const records = await collect(streamOf([bytes.slice(0, 7), bytes.slice(7, 8), bytes.slice(8)]));
    expect(records.map((r) => r.fields[0])).toEqual(["note", "Témpérature élevée"]);
  });

  it("stops at the size limit while reading and refuses text that is not UTF-8", async () => {
    await expect(collect(streamOf(["a,b\n", "1,2\n", "3,4\n"]), 6)).rejects.toMatchObject({ code: "too_large" });
    await expect(collect(streamOf([new Uint8Array([0x61, 0x0a, 0xe9, 0x0a])]))).rejects.toBeInstanceOf(CsvStreamError);
  });
});

describe("writing CSV", () => {
  it("quotes what needs quoting and doubles quotes (RFC 4180 §2.6–2.7), ending records with CRLF", () => {
    expect(csvRecord(["aaa", "b,bb", 'b"bb', "b\nbb", 1.5, null, true])).toBe('aaa,"b,bb","b""bb","b\nbb",1.5,,true\r\n');
    expect(csvField(new Date(Date.UTC(2026, 2, 14, 6, 30)))).toBe("2026-03-14T06:30:00.000Z");
    expect(csvField(Number.NaN)).toBe("");
  });

  it("defuses text a spreadsheet would run as a formula (OWASP CSV injection), but not negative numbers", () => {
    expect(csvField("=1+2")).toBe("'=1+2");
    expect(csvField("@SUM(A1)")).toBe("'@SUM(A1)");
    expect(csvField(-0.25)).toBe("-0.25");
  });

  it("reads back what it writes", () => {
    const rows = [["a", 'q"uote', "com,ma", "line\r\nbreak"], ["", "x", "y", "z"]];
    expect(fields(rows.map((r) => csvRecord(r)).join(""))).toEqual(rows);
  });

  it("streams a header and then batches, pulled as read", async () => {
    async function* batches() {
      yield [[1, "a"]];
      yield [[2, "b"], [3, "c"]];
    }
    const text = await new Response(csvStream(["n", "s"], batches())).text();
    expect(text).toBe("n,s\r\n1,a\r\n2,b\r\n3,c\r\n");
    expect(attachmentName("measurements Tank 3/ø 2026")).toBe("measurements-Tank-3-2026.csv");
  });
});
