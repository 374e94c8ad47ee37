// The load side of bench:scale, its own process: device batches through the load balancer (autocannon)
// while operators' dashboard routes are read at the same time (one client a route). Prints one JSON
// line: accepted readings, answers by status, socket errors, and each route's latencies.
import autocannon from "autocannon";

const config = JSON.parse(process.argv[2]);
const { lbUrl, keys, seconds, batch, ingestConnections, seqBase, cookie, routes } = config;

let requestsMade = 0;
let accepted = 0;
const statuses = {};
const seqOf = new Map();

// Each device counts its own seqs from seqBase, so a phase never repeats an earlier phase's readings.
function body(key) {
  const base = seqOf.get(key) ?? seqBase;
  seqOf.set(key, base + batch);
  const at = new Date().toISOString();
  const readings = [];
  for (let i = 0; i < batch; i++) readings.push({ seq: base + i, channel: (base + i) % 8, at, echo_us: 5000 + ((base + i) % 900) });
  return JSON.stringify({ readings });
}

function ingest() {
  if (!ingestConnections) return Promise.resolve(null);
  const instance = autocannon({
    url: `${lbUrl}/api/v1/readings`,
    connections: ingestConnections,
    duration: seconds,
    requests: [
      {
        method: "POST",
        setupRequest: (req) => {
          const key = keys[requestsMade++ % keys.length];
          return { ...req, headers: { "content-type": "application/json", authorization: `Bearer ${key}` }, body: body(key) };
        },
      },
    ],
  });
  instance.on("response", (_client, status) => {
    statuses[status] = (statuses[status] ?? 0) + 1;
    if (status === 202) accepted += batch;
  });
  return instance;
}

function dashboard(name, route) {
  const times = [];
  let non2xx = 0;
  const instance = autocannon({ url: `${lbUrl}${route}`, connections: 1, duration: seconds, headers: { cookie } });
  instance.on("response", (_client, status, _bytes, responseTime) => {
    times.push(responseTime);
    if (status < 200 || status >= 300) non2xx += 1;
  });
  return instance.then((r) => ({ name, times, non2xx, errors: r.errors + r.timeouts }));
}

const [ingestResult, ...reads] = await Promise.all([ingest(), ...Object.entries(routes).map(([name, route]) => dashboard(name, route))]);
process.stdout.write(
  JSON.stringify({
    ingest: ingestResult && { requests: ingestResult.requests.total, accepted, statuses, errors: ingestResult.errors + ingestResult.timeouts, seconds },
    dashboard: Object.fromEntries(reads.map((r) => [r.name, { times: r.times, non2xx: r.non2xx, errors: r.errors }])),
  }) + "\n",
);
