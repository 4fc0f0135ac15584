import { render, screen, within } from '@testing-library/react-native';
import { ChecksTable, marginText, orderChecks, type CheckRow } from '@/components/checks/ChecksTable';
import { ThemeProvider } from '@/lib/theme';

const base = { basis: 'rating × derating', message: '', limit: 100, deratedLimit: 80, unit: 'V' };
const checks: CheckRow[] = [
  { ...base, id: 'pass-1', label: 'Capacitor voltage', value: 60, marginPercent: 25, status: 'pass' },
  { ...base, id: 'fail-1', label: 'Bus overshoot', value: 109, marginPercent: -36.25, status: 'fail' },
  {
    ...base,
    id: 'nc-1',
    label: 'Fuse I²t',
    value: null,
    limit: null,
    deratedLimit: null,
    marginPercent: null,
    status: 'not-checked',
    unit: 'A²s',
  },
  { ...base, id: 'warn-1', label: 'Inrush current', value: 78, marginPercent: 2.5, status: 'warn' },
  { ...base, id: 'fail-2', label: 'Precharge energy', value: 90, marginPercent: -12.5, status: 'fail' },
];

const renderTable = (layout: 'table' | 'list') =>
  render(
    <ThemeProvider scheme="light">
      <ChecksTable checks={checks} layout={layout} />
    </ThemeProvider>,
  );

describe('ChecksTable', () => {
  it('orders failures first (worst margin first), then warnings, not checked, passes', () => {
    expect(orderChecks(checks).map((c) => c.id)).toEqual(['fail-1', 'fail-2', 'warn-1', 'nc-1', 'pass-1']);
  });

  it.each(['table', 'list'] as const)('renders rows in that order in the %s layout', (layout) => {
    renderTable(layout);
    const ids = screen.getAllByTestId(/^check-[a-z]+-\d$/).map((el) => el.props.testID);
    expect(ids).toEqual(['check-fail-1', 'check-fail-2', 'check-warn-1', 'check-nc-1', 'check-pass-1']);
  });

  it.each([
    ['fail-1', 'fail'],
    ['warn-1', 'warn'],
    ['nc-1', 'not checked'],
    ['pass-1', 'pass'],
  ])('shows the status of %s as an icon and the word "%s", not colour alone', (id, word) => {
    renderTable('table');
    const badge = screen.getByTestId(`check-${id}-status`);
    expect(within(badge).getByText(word)).toBeTruthy();
    // The glyph is an SVG drawn beside the word.
    expect(badge.findAll((node) => typeof node.type === 'string' && /svg/i.test(node.type)).length).toBeGreaterThan(0);
    expect(badge.props.accessibilityLabel).toBe(`Status: ${word}`);
  });

  it('shows values, limits and margins in engineering notation', () => {
    renderTable('table');
    const row = screen.getByTestId('check-fail-1');
    expect(within(row).getByText('109 V')).toBeTruthy();
    expect(within(row).getByText('80 V')).toBeTruthy();
    expect(within(row).getByText('−36.3 %')).toBeTruthy();
    expect(marginText(12.04)).toBe('+12.0 %');
  });
});
