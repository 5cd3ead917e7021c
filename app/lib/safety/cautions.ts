/**
 * The general safety cautions for falling-sphere kits, in one place: the kit pages, the student's kit
 * page, lab pages, the packing slip and the kit-shipped e-mail all show this list, so a change here
 * reaches every one of them. Plain data, so the e-mail templates can use it without the app's UI.
 */

export type SafetyCaution = {
  /** A few words to find the caution by at a glance. */
  topic: string;
  text: string;
};

export const safetyCautions: readonly SafetyCaution[] = [
  {
    topic: "Magnets",
    text: "Keep the neodymium retrieval magnet away from young children and pets: two swallowed magnets can pull together through the gut and cause serious internal injury. Magnets snap together and pinch fingers. Keep them away from pacemakers and other implanted devices.",
  },
  {
    topic: "Small spheres",
    text: "Every sphere in the kit, steel, glass or plastic, is small enough for a child to choke on. Count them back into their box after each session and keep the box closed and out of reach.",
  },
  {
    topic: "Glass column",
    text: "A tall column tips over easily: stand it on a stable, level base and work over a tray that can catch the fluid.",
  },
  {
    topic: "Broken glass",
    text: "If glass breaks, keep others away, sweep the pieces up with a brush and dustpan (never with bare hands), wrap them in newspaper or a box before they go in the bin, and wipe the spot with a damp paper towel for the splinters.",
  },
  {
    topic: "Spills",
    text: "Spilled glycerol or syrup makes floors and tables slippery. Wipe it up at once with warm water and dry the spot.",
  },
  {
    topic: "Warming the fluid",
    text: "If the fluid must be warmer, stand its bottle, cap loosened, in a bowl of warm tap water. Never use a microwave, a hob or a kettle, and never heat a closed bottle: it can burst. Hot water and warm fluid can scald, so test the temperature before handling.",
  },
  {
    topic: "Eyes",
    text: "If fluid gets in an eye, rinse it with plenty of clean running water for several minutes, and get medical advice if it still hurts.",
  },
  {
    topic: "Lab fluid, not food",
    text: "Keep each fluid in its own bottle with its \u201clab fluid, not food\u201d label, never in a cup, drinks bottle or food container, and do not taste it.",
  },
  {
    topic: "Disposal",
    text: "Dispose of the fluids as the kit sheet says, or send them back in the kit when it returns.",
  },
  {
    topic: "Children",
    text: "Children use the kit only with an adult watching the whole time; between sessions the kit goes back out of their reach.",
  },
];

/** Said with every list of cautions: the institution's own rules come first. */
export const safetyCautionsDeferral = "These are general cautions. Your institution's lab-safety rules and local regulations come first.";
