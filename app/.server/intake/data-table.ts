// The trial's data table: derived values per sample for the Data page and its CSV export.
import type { CsvCell } from "../csv";
import { rounded } from "../csv";
import { loadDerivedSamples, type DerivedSample } from "./derived";

export interface DataFilter {
  eventId?: string;
  treatment?: string;
  depth?: string;
  excludedOnly?: boolean;
}

export async function dataRows(trialId: string, filter: DataFilter): Promise<DerivedSample[]> {
  const rows = await loadDerivedSamples(trialId, { eventId: filter.eventId, measuredOnly: true });
  return rows.filter(
    (r) =>
      (!filter.treatment || r.treatmentCode === filter.treatment) &&
      (!filter.depth || `${r.topCm}-${r.bottomCm}` === filter.depth) &&
      (!filter.excludedOnly || r.excluded),
  );
}

/** Columns of the data table and export: id, heading with unit, decimals. */
export const DATA_COLUMNS: [keyof DerivedSample, string, number][] = [
  ["loi", "LOI %", 2],
  ["som", "SOM %", 2],
  ["soc", "SOC %", 2],
  ["bd", "BD g/cm³", 3],
  ["bd_fine", "BD fine g/cm³", 3],
  ["moisture", "Moisture % dry basis", 1],
  ["soc_stock", "SOC stock Mg C/ha", 2],
  ["soc_stock_cumulative", "SOC stock from 0 cm Mg C/ha", 2],
  ["fine_earth_mass_cumulative", "Fine-earth mass from 0 cm Mg/ha", 0],
];

export async function dataCsvRows(trialId: string, filter: DataFilter): Promise<CsvCell[][]> {
  const rows = await dataRows(trialId, filter);
  const customIds = [...new Set(rows.flatMap((r) => Object.keys(r.custom)))].sort();
  return [
    [
      "sample_code", "event", "season", "event_date", "baseline", "plot", "block", "treatment_code", "top_cm", "bottom_cm",
      "loi_pct", "som_pct", "soc_pct", "bd_g_cm3", "bd_fine_g_cm3", "moisture_pct_dry_basis", "soc_stock_mg_ha", "soc_stock_cumulative_mg_ha", "fine_earth_mass_mg_ha", "fine_earth_mass_cumulative_mg_ha",
      ...customIds, "excluded", "qc_reasons",
    ],
    ...rows.map((r) => [
      r.sampleCode, r.eventCode, r.season, r.eventDate, r.isBaseline, r.plotNumber, r.block, r.treatmentCode, r.topCm, r.bottomCm,
      rounded(r.loi, 3), rounded(r.som, 3), rounded(r.soc, 3), rounded(r.bd, 4), rounded(r.bd_fine, 4), rounded(r.moisture, 2),
      rounded(r.soc_stock, 3), rounded(r.soc_stock_cumulative, 3), rounded(r.fine_earth_mass, 1), rounded(r.fine_earth_mass_cumulative, 1),
      ...customIds.map((id) => rounded(r.custom[id], 4)),
      r.excluded,
      r.measurements.filter((m) => m.status === "excluded").map((m) => `${m.kind}: ${m.statusReason ?? ""}`).join("; "),
    ]),
  ];
}
