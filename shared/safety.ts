/** The notice every board, compressor page, alarm e-mail and the README carry. */
export const SAFETY_NOTICE =
  "Airkeep is a monitoring aid, not a safety device or interlock. The compressor's own protective devices, the maker's instructions, local regulations and licensed practice govern. Data can be late or missing: always check the age of a reading.";

/** The trade's usual cautions, shown where they matter. */
export const cautions = {
  intakeCo: "Keep the air intake clear of engine exhaust and other sources of carbon monoxide.",
  hotStage: "An overheating stage can crack lubricating oil into carbon monoxide; stop and investigate before filling.",
  oilCarryOver: "Oil carry-over contaminates breathing air and loads the purifier.",
  spentCartridge: "A spent purifier cartridge passes wet air; replace it on time.",
  cylinderFill: "Never overfill a cylinder or fill it hot; follow the cylinder's working pressure and fill rate.",
} as const;
