// Screens that need the network say so in words with no signal, and a screen already open keeps what was typed.
import { afterEach, describe, expect, it } from 'vitest';
import { act, cleanup, render, screen } from '@testing-library/react';
import { onlineManager } from '@tanstack/react-query';
import { MemoryRouter } from 'react-router';
import { NeedsNetwork } from '../../src/components/needs-network.tsx';

afterEach(() => {
  cleanup();
  onlineManager.setOnline(true);
});

function screenUnderTest() {
  return render(
    <MemoryRouter>
      <NeedsNetwork what="The review desk" why="Decisions are made online.">
        <label>
          Reason <input aria-label="Reason" defaultValue="" />
        </label>
      </NeedsNetwork>
    </MemoryRouter>,
  );
}

describe('needs the network', () => {
  it('when a screen is opened with no signal, then the notice says so in words and the screen is not tried', () => {
    onlineManager.setOnline(false);
    screenUnderTest();
    const notice = screen.getByTestId('needs-network');
    expect(notice.textContent).toContain('The review desk needs the network');
    expect(notice.textContent).toContain('There is no connection right now. Decisions are made online.');
    expect(screen.queryByLabelText('Reason')).toBeNull();
    act(() => onlineManager.setOnline(true));
    expect(screen.queryByTestId('needs-network')).toBeNull();
    expect(screen.getByLabelText('Reason')).toBeTruthy();
  });

  it('when the signal drops on an open screen, then what was typed stays, out of reach, until the signal returns', () => {
    screenUnderTest();
    const input = screen.getByLabelText('Reason') as HTMLInputElement;
    input.value = 'Clearance measured twice';
    expect(screen.queryByTestId('needs-network')).toBeNull();
    act(() => onlineManager.setOnline(false));
    expect(screen.getByTestId('needs-network')).toBeTruthy();
    expect(screen.getByTestId('needs-network-paused').hasAttribute('inert')).toBe(true);
    expect((screen.getByLabelText('Reason') as HTMLInputElement).value).toBe('Clearance measured twice');
    act(() => onlineManager.setOnline(true));
    expect(screen.queryByTestId('needs-network')).toBeNull();
    expect(screen.getByLabelText('Reason')).toBe(input);
    expect(input.value).toBe('Clearance measured twice');
  });
});
