/** A published source a figure or rule comes from, quoted beside every result that uses it. */
export interface Source {
  readonly title: string;
  readonly section?: string;
  readonly confidence?: 'published' | 'medium' | 'from memory' | 'workshop';
}

/** Sources used by the default tables. */
export const sources = {
  handbookBimetal: {
    title: "Machinery's Handbook, 31st ed.",
    section: 'Bimetal Band Saw Speeds for Cutting 4-Inch Material with Coolant, p. 1245',
    confidence: 'published',
  },
  benchSawDryChart: {
    title: 'Dry-cutting speed chart in a bench metal bandsaw manual',
    section: 'ft/min by section 0–½ in, ½–1 in, over 1 in',
    confidence: 'published',
  },
  threeTeethRule: {
    title: 'Introduction to Machining (open textbook); Agricultural Mechanics and Technology Systems',
    section: '§7.4 "three tooth principle"; p. 202',
    confidence: 'published',
  },
  teethInCutUpper: {
    title: 'Trade article on band saw tooth selection',
    section: 'not more than about 10–14 teeth in the cut',
    confidence: 'medium',
  },
  stressTargets: {
    title: 'Trade articles on band saw blade tension',
    section: 'carbon 15,000–20,000 psi; bi-metal 25,000–30,000 psi; never past about 35,000 psi',
    confidence: 'medium',
  },
  elasticModuli: {
    title: 'Triton College strength-of-materials tables; Halliday, Resnick & Walker',
    section: 'table of elastic moduli',
    confidence: 'published',
  },
  beltDeflection: {
    title: 'US Army TM 5-3820-233-12, fig. 4-51; H. P. Bloch, Practical Machinery Management for Process Plants',
    section: 'fig. 7-14: deflection h = t/64',
    confidence: 'published',
  },
  beltForceTable: {
    title: "Belt maker's installation guide",
    section: 'table 5, deflection force',
    confidence: 'published',
  },
  breakIn: {
    title: "Blade manufacturers' practice (no standard)",
    section: 'about half feed for the first 50–100 in² of cut',
    confidence: 'medium',
  },
  feelerSet: {
    title: 'Typical metric feeler gauge set (leaves within BS 957:2008 range 0.03–1.00 mm)',
    confidence: 'from memory',
  },
} as const satisfies Record<string, Source>;
