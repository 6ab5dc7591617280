// Safety cautions: one list, headed "Cautions", printed by inflate, compare, fabricate, play and the report.

/** One caution per line; printed in full by every command that hands on figures to make things from. */
export const CAUTIONS: readonly string[] = [
  'The figures are geometric limits for round, rigid rings touching with zero clearance: real rings need clearance, and wire springs back (thickring fabricate adds both).',
  'Printed or wire rings are not rated for lifting, climbing, towing or any load-bearing or safety use.',
  'Small parts are a choking hazard: keep rings and chain away from young children and pets.',
  'Jewellery materials must meet local rules for skin contact (for example limits on nickel release).',
  'Defer to local codes, standards and licensed practice for anything beyond decoration and models.',
];

/** The cautions as one block of text (heading plus one line each). */
export const CAUTION_TEXT = ['Cautions:', ...CAUTIONS.map((c) => `- ${c}`)].join('\n');
