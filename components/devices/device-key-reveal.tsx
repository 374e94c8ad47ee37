import { CopyButton } from "@/components/ui/copy-button";

/** A device key as the API answers it, this once: Halftrip keeps only its hash. */
export function DeviceKeyReveal({ apiKey, heading }: { apiKey: string; heading: string }) {
  return (
    <section aria-labelledby="device-key-heading" className="card space-y-3 border-l-4 border-l-ink p-4">
      <h2 id="device-key-heading" className="text-lg font-bold">{heading}</h2>
      <p className="text-sm">
        Copy this key into the device now. <strong>You will not see it again:</strong> Halftrip stores only a hash of it. If it is lost,
        rotate the key on the device page.
      </p>
      <code id="device-api-key" data-testid="device-api-key" className="figures block select-all break-all rounded border border-rule bg-paper p-3">
        {apiKey}
      </code>
      <CopyButton text={apiKey} targetId="device-api-key" label="Copy key" />
    </section>
  );
}
