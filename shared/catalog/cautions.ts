// Safety wording the catalog attaches to build steps and shows at the bench. Defers to local rules.

/** Carried by every build step that involves soldering (seeded, and added by the step form when soldering is ticked). */
export const SOLDERING_CAUTION =
  'Soldering: the iron tip is around 350 °C — park it in its stand and never reach across it. Work with fume extraction or good ventilation; '
  + 'flux fumes irritate the lungs. Leaded solder: wash your hands before eating or drinking and keep food off the bench. '
  + 'Wear eye protection when clipping leads. Follow your workshop rules and local regulations.';
