import { fireEvent, render, screen } from '@testing-library/react-native';
import { useState } from 'react';
import { UnitField } from '@/components/ui/UnitField';
import type { Dimension } from '@/sim/units';
import { ThemeProvider } from '@/lib/theme';

function Harness({ dimension, initial = '' }: { dimension: Dimension; initial?: string }) {
  const [text, setText] = useState(initial);
  return (
    <ThemeProvider scheme="light">
      <UnitField label="Field" dimension={dimension} value={text} onChangeText={setText} testID="field" />
    </ThemeProvider>
  );
}

describe('UnitField', () => {
  it.each([
    ['470µ', 'capacitance', '= 470 µF'],
    ['4k7', 'resistance', '= 4.7 kΩ'],
    ['20 mΩ', 'resistance', '= 20 mΩ'],
    ['2.2 mH', 'inductance', '= 2.2 mH'],
    ['800', 'voltage', '= 800 V'],
  ] as const)('reads "%s" in a %s field and shows %s', (typed, dimension, shown) => {
    render(<Harness dimension={dimension} />);
    fireEvent.changeText(screen.getByTestId('field'), typed);
    expect(screen.getByTestId('field-parsed')).toHaveTextContent(shown);
    expect(screen.queryByTestId('field-error')).toBeNull();
  });

  it('names the problem when a voltage is typed into a capacitance field', () => {
    render(<Harness dimension="capacitance" />);
    fireEvent.changeText(screen.getByTestId('field'), '5 V');
    const error = screen.getByTestId('field-error');
    expect(error).toHaveTextContent(/capacitance/);
    expect(error).toHaveTextContent(/voltage/);
    expect(screen.queryByTestId('field-parsed')).toBeNull();
  });

  it('labels the input for screen readers with its unit', () => {
    render(<Harness dimension="capacitance" initial="940µ" />);
    expect(screen.getByLabelText('Field, in F')).toBeTruthy();
    expect(screen.getByTestId('field-parsed')).toHaveTextContent('= 940 µF');
  });
});
