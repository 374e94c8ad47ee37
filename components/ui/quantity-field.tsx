"use client";

// The kit's box for a length, volume or temperature: it shows the person's unit and reads what they
// type in it ("2,45", "8 ft 3.5 in", "300 gal", "68 °F") through the form's useQuantityInput(), which
// turns it into SI before the form submits.

import type { Quantity } from "@/lib/units/units";
import type { QuantityInput } from "@/lib/units/quantity-input";
import { NumberField } from "@/components/ui/form-fields";

type NumberFieldProps = React.ComponentProps<typeof NumberField>;

export function QuantityField({ input, quantity, fine, error, value, ...props }: Omit<NumberFieldProps, "unit"> & { input: QuantityInput; quantity: Quantity; fine?: boolean; value?: string }) {
  // A value that is not a quantity says why in the person's terms rather than the schema's "not a number"
  // (a react-hook-form box, uncontrolled, gets that message from its form's schema instead).
  const problem = error && value !== undefined ? input.problem(value, quantity, fine) : null;
  return <NumberField unit={input.symbolOf(quantity, fine)} value={value} error={problem ?? error} {...props} />;
}
