// Ringwell's tokens (DESIGN.md) as the PDF uses them, and the shipped fonts (SIL OFL 1.1, licences
// beside them in fonts/).
import path from 'node:path';

export const colours = {
  ink: '#1B2430',
  muted: '#5A6473',
  paper: '#FFFFFF',
  hairline: '#E2DED6',
  accent: '#2F5D8A',
  accentSoft: '#E3ECF5',
  pass: '#2E7D4F',
  warn: '#B7791F',
  fail: '#B3261E',
  notChecked: '#6B7280',
  capacitorVoltage: '#2F5D8A',
  busVoltage: '#7A4FA3',
  current: '#C0562B',
};

export const fonts = { regular: 'Inter', semibold: 'Inter-SemiBold', mono: 'JetBrainsMono' };

const dir = path.join(__dirname, 'fonts');
export const fontFiles: Record<string, string> = {
  [fonts.regular]: path.join(dir, 'Inter_400Regular.ttf'),
  [fonts.semibold]: path.join(dir, 'Inter_600SemiBold.ttf'),
  [fonts.mono]: path.join(dir, 'JetBrainsMono_400Regular.ttf'),
};
