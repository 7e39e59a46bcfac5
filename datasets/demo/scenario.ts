// The invented demo scenario (all names and numbers are made up): one program, one person per
// role, one site on a degraded silt loam and a six-treatment RCBD trial.

export const DEMO_PASSWORD = "tilthmark-demo";

export const demoProgram = { name: "Cedar Hollow Research Farm", slug: "cedar-hollow" };

export const demoUsers = [
  { role: "owner", name: "Ruth Alder", email: "owner@cedarhollow.example", isAdmin: true },
  { role: "researcher", name: "Tomás Reyes", email: "researcher@cedarhollow.example", isAdmin: false },
  { role: "technician", name: "Priya Nandakumar", email: "technician@cedarhollow.example", isAdmin: false },
  { role: "collaborator", name: "Lena Ostrowski", email: "collaborator@cedarhollow.example", isAdmin: false },
  { role: "extension", name: "Sam Whitfield", email: "extension@cedarhollow.example", isAdmin: false },
] as const;

export const demoSite = {
  name: "North Field",
  latitude: 40.0712,
  longitude: -88.1964,
  soilSeries: "Cedar Hollow silt loam, eroded phase",
  textureClass: "silt loam",
  sandPct: 18,
  siltPct: 66,
  clayPct: 16,
  notes: "Row-cropped for decades; topsoil thinned by erosion on the upper slope. Invented for the demo.",
};

export const demoTrial = {
  title: "Rapid organic-matter building, 2025–2027",
  objective:
    "Test whether surface-applied organic amendments raise soil organic matter in the top 30 cm of a degraded silt loam within three years, compared with an untreated check.",
  hypotheses:
    "H1: Compost at 20 Mg DM/ha raises SOM in 0–10 cm above the check by the second fall.\nH2: A fortnightly compost-extract drench adds nothing measurable beyond compost alone.\nH3: Changes in SOC stock hold when compared on an equivalent soil mass basis.",
  design: "rcbd" as const,
  blockCount: 4,
  plotLengthM: 6,
  plotWidthM: 3,
  alleyBetweenPlotsM: 1,
  alleyBetweenBlocksM: 2,
};

export const demoTreatments = [
  { code: "T1", name: "Untreated check", description: "No amendment; same tillage and cover as all plots.", isCheck: true },
  { code: "T2", name: "Yard-waste compost", description: "Municipal yard-waste compost at 20 Mg DM/ha each spring.", isCheck: false },
  { code: "T3", name: "Leaf mould + spent coffee grounds", description: "Blend by dry mass to about 25:1 C:N, 15 Mg DM/ha.", isCheck: false },
  { code: "T4", name: "Sheet mulch over cardboard", description: "Plain cardboard under 10 cm of wood-chip mulch.", isCheck: false },
  { code: "T5", name: "Compost + extract drench", description: "As T2, plus a compost-extract drench every two weeks in season.", isCheck: false },
  { code: "T6", name: "Aged cattle manure", description: "Stacked cattle manure at 15 Mg DM/ha each spring.", isCheck: false },
];

/** Seed of the demo layout, as a researcher would have drawn it before locking. */
export const demoLayoutSeed = 20250314;

/** Amendments and their batches (lab analyses invented; moisture on a wet basis, C and N dry basis). */
export const demoAmendments = [
  {
    name: "Yard-waste compost",
    material: "compost" as const,
    source: "County green-waste facility",
    batches: [
      { label: "YWC-2025-A", receivedOn: "2025-04-02", moistureWetBasisPct: 38, totalCarbonDryPct: 24.5, totalNitrogenDryPct: 1.6, ph: 7.6, ecDsPerM: 2.1, compostingMethod: "turned_windrow" as const },
    ],
  },
  {
    name: "Leaf mould",
    material: "leaf_mould" as const,
    source: "Campus grounds, two-year leaf pile",
    batches: [{ label: "LM-2025-A", receivedOn: "2025-03-20", moistureWetBasisPct: 52, totalCarbonDryPct: 38.0, totalNitrogenDryPct: 1.1, ph: 6.4, ecDsPerM: 0.6, compostingMethod: null }],
  },
  {
    name: "Spent coffee grounds",
    material: "spent_coffee_grounds" as const,
    source: "Student union cafés",
    batches: [{ label: "SCG-2025-A", receivedOn: "2025-03-28", moistureWetBasisPct: 60, totalCarbonDryPct: 47.0, totalNitrogenDryPct: 2.2, ph: 5.6, ecDsPerM: 1.0, compostingMethod: null }],
  },
  {
    name: "Cardboard and wood-chip mulch",
    material: "cardboard" as const,
    source: "Plain corrugated cardboard; arborist wood chips",
    batches: [{ label: "SM-2025-A", receivedOn: "2025-04-01", moistureWetBasisPct: 35, totalCarbonDryPct: 46.0, totalNitrogenDryPct: 0.3, ph: null, ecDsPerM: null, compostingMethod: null }],
  },
  {
    name: "Compost extract",
    material: "microbial_drench" as const,
    source: "Brewed on site from YWC-2025-A, 24 h aerated",
    batches: [{ label: "CX-2025", receivedOn: "2025-04-10", moistureWetBasisPct: null, totalCarbonDryPct: null, totalNitrogenDryPct: null, ph: 7.2, ecDsPerM: 0.8, compostingMethod: null }],
  },
  {
    name: "Aged cattle manure",
    material: "manure" as const,
    source: "University dairy, stacked 9 months",
    batches: [{ label: "CM-2025-A", receivedOn: "2025-04-03", moistureWetBasisPct: 55, totalCarbonDryPct: 34.0, totalNitrogenDryPct: 2.3, ph: 8.1, ecDsPerM: 4.5, compostingMethod: "static_pile" as const }],
  },
];

/** Treatment code → applications (batch label, dry-matter rate or layer, timing). */
export const demoApplications: Record<string, { batch: string; rateMgDmPerHa?: number; layerDepthCm?: number; timing: "once" | "each_season" | "every_n_weeks"; everyNWeeks?: number }[]> = {
  T1: [],
  T2: [{ batch: "YWC-2025-A", rateMgDmPerHa: 20, timing: "each_season" }],
  T3: [
    { batch: "LM-2025-A", rateMgDmPerHa: 10, timing: "each_season" },
    { batch: "SCG-2025-A", rateMgDmPerHa: 5, timing: "each_season" },
  ],
  T4: [{ batch: "SM-2025-A", layerDepthCm: 10, timing: "once" }],
  T5: [
    { batch: "YWC-2025-A", rateMgDmPerHa: 20, timing: "each_season" },
    { batch: "CX-2025", timing: "every_n_weeks", everyNWeeks: 2 },
  ],
  T6: [{ batch: "CM-2025-A", rateMgDmPerHa: 15, timing: "each_season" }],
};

/** The demo's first field brief (its numbers are computed from the demo data when seeded). */
export const demoBrief = {
  title: "Compost raised soil organic matter in the top 10 cm at Cedar Hollow",
  summary:
    "After five seasons of applications on a degraded silt loam, yard-waste compost — alone or with a compost-extract drench — " +
    "raised soil organic matter in the top 10 cm the most compared with untreated plots. The drench added nothing measurable " +
    "beyond compost alone. Leaf mould with coffee grounds, sheet mulch and cattle manure gave smaller gains.",
  context:
    "North Field, Cedar Hollow silt loam (eroded phase); six treatments in four blocks; compost at 20 Mg dry matter per hectare each spring. Invented demo data.",
  authors: "T. Reyes and R. Alder",
  isPublic: true,
  includeWater: true,
  selection: { variables: ["som", "soc_stock"], depth: "0-10", method: "tukey" as const, alpha: 0.05 },
};
