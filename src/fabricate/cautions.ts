// Safety cautions printed with every fabricate run and exported for the README.

/** One caution per line; printed in full with every `thickring fabricate` run. */
export const CAUTIONS: readonly string[] = [
  'Printed or wire rings are not rated for lifting, climbing, towing or any load-bearing or safety use.',
  'Small parts are a choking hazard: keep rings and chain away from young children and pets.',
  'Jewellery materials must meet local rules for skin contact (for example limits on nickel release).',
  'Defer to local codes, standards and licensed practice for anything beyond decoration and models.',
];

/** The cautions as one block of text (heading plus one line each). */
export const CAUTION_TEXT = ['CAUTIONS:', ...CAUTIONS.map((c) => `- ${c}`)].join('\n');
