/** The closing line of every plain-text report (the field brief asks every report to carry it). */
export const CAUTION =
  "These figures are estimates under the contract's M&V plan and the cited methods; contractual and engineering decisions rest with the parties and a licensed professional, under local rules.";
