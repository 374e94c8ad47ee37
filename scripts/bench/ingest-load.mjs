// The load side of bench:ingest, run as its own process so it does not share a core's event loop with
// the server. Prints one JSON line of autocannon's figures.
import autocannon from "autocannon";

const [url, mode, batchSize, keysJson, duration] = process.argv.slice(2);
const keys = JSON.parse(keysJson);
const size = Number(batchSize);
let counter = 0;
let requestsMade = 0;

function body() {
  const base = counter;
  counter += size;
  const at = new Date().toISOString();
  const readings = [];
  for (let i = 0; i < size; i++) readings.push({ seq: base + i, channel: (base + i) % 8, at, echo_us: 5000 + ((base + i) % 900) });
  return JSON.stringify({ readings });
}

const opts =
  mode === "bare"
    ? { url: `${url}/api/v1/time`, connections: 20, duration: Number(duration) }
    : {
        url: `${url}/api/v1/readings`,
        connections: 20,
        duration: Number(duration),
        requests: [
          {
            method: "POST",
            setupRequest: (req) => ({
              ...req,
              headers: { "content-type": "application/json", authorization: `Bearer ${keys[requestsMade++ % keys.length]}` },
              body: body(),
            }),
          },
        ],
      };

const result = await autocannon(opts);
process.stdout.write(
  JSON.stringify({
    rps: result.requests.average,
    p50: result.latency.p50,
    p99: result.latency.p99,
    non2xx: result.non2xx,
    errors: result.errors,
    total: result.requests.total,
  }) + "\n",
);
