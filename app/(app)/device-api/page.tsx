import type { Metadata } from "next";
import { requirePageUser } from "@/lib/auth/session";
import { PageHeader } from "@/components/ui/page-header";
import { appUrl } from "@/lib/mail/send-mail";
import { MAX_BODY_BYTES, MAX_READINGS_PER_REQUEST } from "@/lib/validations/reading";

export const metadata: Metadata = { title: "Device API" };

function Example({ title, children }: { title: string; children: string }) {
  return (
    <section className="card p-4">
      <h2 className="mb-2 font-bold">{title}</h2>
      <pre className="figures overflow-x-auto whitespace-pre rounded bg-paper p-3 text-sm">{children}</pre>
    </section>
  );
}

export default async function DeviceApiPage() {
  await requirePageUser();
  const base = appUrl();
  const curl = (body: string) => `curl -X POST ${base}/api/v1/readings \\\n  -H "Authorization: Bearer $HALFTRIP_KEY" \\\n  -H "Content-Type: application/json" \\\n  -d '${body}'`;
  return (
    <>
      <PageHeader
        title="Device API"
        facts={`For firmware and gateway integrators · version 1 · machine-readable at ${base}/api/v1/openapi.json`}
      />
      <div className="space-y-4">
        <section className="card space-y-2 p-4 text-sm">
          <p>
            Each device posts its readings to <code className="figures">POST /api/v1/readings</code> with its own key (shown once when an admin
            creates the device or rotates its key). Up to {MAX_READINGS_PER_REQUEST} readings and {MAX_BODY_BYTES / 1024} KiB a request.
          </p>
          <p>
            <strong>seq</strong> is the device&apos;s own counter per channel: resending a batch with the same seq values is harmless, so after a
            timeout, a 429 or a 503, keep the batch and send it again after <code>Retry-After</code> seconds. <strong>at</strong> is optional
            (server time when absent); readings more than 5 minutes ahead are rejected, older ones are fine.
          </p>
          <p>Send exactly one signal per reading, the one the device&apos;s profile uses:</p>
          <ul className="list-inside list-disc">
            <li><code>echo</code>: <code>echo_us</code>, the echo high time (round trip), or a burst <code>samples_us</code>.</li>
            <li><code>capture</code>: raw timer <code>ticks</code> and <code>overflows</code>; the clock, prescaler and timer width are set on the device.</li>
            <li><code>pulse_coded</code>: <code>pulse_us</code> from a self-compensating sensor, with the device&apos;s µs-per-mm scale.</li>
            <li><code>duty_coded</code>: <code>high_us</code> and <code>period_us</code> of the PWM output.</li>
          </ul>
        </section>
        <Example title="An echo reading with the unit's own air temperature">
          {curl('{"readings":[{"seq":1042,"at":"2026-03-14T06:30:00Z","channel":0,"echo_us":5831.5,"air_temp_c":11.5,"battery_v":3.71,"rssi_dbm":-87}]}')}
        </Example>
        <Example title="Raw timer counts (capture profile)">{curl('{"readings":[{"seq":1043,"channel":1,"ticks":11663,"overflows":0}]}')}</Example>
        <Example title="A burst of pings (the median is used, the spread rated)">
          {curl('{"readings":[{"seq":1044,"channel":2,"samples_us":[5830,5832,6410,5829,5831]}]}')}
        </Example>
        <Example title="PWM duty (duty_coded profile)">{curl('{"readings":[{"seq":1045,"channel":3,"high_us":412.0,"period_us":1000.0}]}')}</Example>
        <Example title="What comes back">
          {`202 {"accepted":1,"duplicates":0,"rejected":[],"server_time":"2026-03-14T06:30:01.204Z"}

400 malformed JSON, wrong top-level shape or over ${MAX_READINGS_PER_REQUEST} readings
401 missing, unknown or revoked key       413 body over ${MAX_BODY_BYTES / 1024} KiB
415 not JSON                              429 over the device's rate (Retry-After)
503 database unavailable (Retry-After): keep the batch and resend
Every error: {"error":"<code>","message":"<what to fix>"}`}
        </Example>
      </div>
    </>
  );
}
