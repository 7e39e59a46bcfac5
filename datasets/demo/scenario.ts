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
