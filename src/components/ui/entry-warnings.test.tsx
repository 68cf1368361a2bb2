// @vitest-environment jsdom
import { cleanup, fireEvent, render, screen } from '@testing-library/react';
import { useState } from 'react';
import { afterEach, describe, expect, it, vi } from 'vitest';
import type { EntryWarning } from '../../../shared/runs/contradictions';
import { EntryWarnings, useGoOnAnyway } from './entry-warnings';

afterEach(cleanup);

const lotWarning: EntryWarning = { code: 'lot-resin-differs', message: 'Lot L-1 is another resin than the plan.', couponIds: [1] };
const mixWarning: EntryWarning = { code: 'conditions-mixed', message: 'The coupons belong to 2 conditions.', couponIds: [1, 2] };

function Form({ initial, onSave }: { initial: EntryWarning[]; onSave: () => void }) {
  const [warnings, setWarnings] = useState(initial);
  const gate = useGoOnAnyway(warnings);
  return (
    <form
      aria-label="Test"
      onSubmit={(e) => {
        e.preventDefault();
        if (gate.mayGoOn()) onSave();
      }}
    >
      <EntryWarnings warnings={warnings} gate={gate} action="save it" />
      <button type="button" onClick={() => setWarnings([lotWarning, mixWarning])}>
        Change
      </button>
      <button type="submit">Save</button>
    </form>
  );
}

describe('a warning the user goes on past deliberately', () => {
  it('sends nothing and says why until the box is ticked, then saves', () => {
    const onSave = vi.fn();
    render(<Form initial={[lotWarning]} onSave={onSave} />);
    expect(screen.getByRole('group', { name: 'This contradicts the records' }).textContent).toContain('Lot L-1 is another resin');
    fireEvent.click(screen.getByRole('button', { name: 'Save' }));
    expect(onSave).not.toHaveBeenCalled();
    expect(screen.getByRole('alert').textContent).toContain('Nothing was saved');
    fireEvent.click(screen.getByRole('checkbox', { name: 'I have read this; save it anyway' }));
    expect(screen.queryByRole('alert')).toBeNull();
    fireEvent.click(screen.getByRole('button', { name: 'Save' }));
    expect(onSave).toHaveBeenCalledTimes(1);
  });

  it('asks again when the warnings change after the tick', () => {
    const onSave = vi.fn();
    render(<Form initial={[lotWarning]} onSave={onSave} />);
    fireEvent.click(screen.getByRole('checkbox', { name: /save it anyway/ }));
    fireEvent.click(screen.getByRole('button', { name: 'Change' }));
    expect((screen.getByRole('checkbox', { name: /save it anyway/ }) as HTMLInputElement).checked).toBe(false);
    fireEvent.click(screen.getByRole('button', { name: 'Save' }));
    expect(onSave).not.toHaveBeenCalled();
  });

  it('shows nothing and lets the save through when nothing contradicts', () => {
    const onSave = vi.fn();
    render(<Form initial={[]} onSave={onSave} />);
    expect(screen.queryByRole('group')).toBeNull();
    fireEvent.click(screen.getByRole('button', { name: 'Save' }));
    expect(onSave).toHaveBeenCalledTimes(1);
  });
});
