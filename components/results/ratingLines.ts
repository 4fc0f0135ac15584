import type { PanelKey, RatingLine } from '@/components/charts/waveformGeometry';
import type { CheckRow } from '@/components/checks/ChecksTable';

/** Which chart panel a check's rating belongs on, and its short name there. */
const ON_CHART: Record<string, { panel: PanelKey; short: string }> = {
  'capacitor-voltage': { panel: 'voltage', short: 'C' },
  'capacitor-surge-voltage': { panel: 'voltage', short: 'C surge' },
  'switch-voltage': { panel: 'voltage', short: 'switch' },
  'inductor-saturation': { panel: 'current', short: 'Isat' },
  'diode-surge-current': { panel: 'current', short: 'IFSM' },
  'contactor-make-current': { panel: 'current', short: 'contactor make' },
  'precharge-peak-power': { panel: 'power', short: 'Rpre peak' },
};

/**
 * Each rating that limits a plotted trace as two dashed lines: the derated limit (crossing it
 * turns the check to warn) and the absolute rating (crossing it is a fail).
 */
export function ratingLinesFrom(checks: CheckRow[]): RatingLine[] {
  const lines: RatingLine[] = [];
  for (const c of checks) {
    const place = ON_CHART[c.id];
    if (!place) continue;
    if (c.deratedLimit !== null && c.limit !== null && c.deratedLimit < c.limit) {
      lines.push({ panel: place.panel, value: c.deratedLimit, label: `${place.short} derated`, status: 'warn' });
    }
    if (c.limit !== null) lines.push({ panel: place.panel, value: c.limit, label: `${place.short} rating`, status: 'fail' });
  }
  return lines;
}
