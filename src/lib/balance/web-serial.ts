import { LineSplitter } from '../../../shared/imports/balance-stream';

/**
 * The thin browser side of a balance on a USB-serial cable: Web Serial (Chromium-based browsers on a
 * computer; not Firefox or Safari, not phones). It asks the person to pick the port, opens it with the
 * balance's settings, and hands each line on; what a line means is decided by the pure, tested
 * `readBalanceLine` (shared/imports/balance-stream.ts).
 */

// The few parts of the Web Serial API used here (the TypeScript DOM library does not declare it yet).
interface SerialPortLike {
  open(options: { baudRate: number; dataBits?: number; stopBits?: number; parity?: 'none' | 'even' | 'odd' }): Promise<void>;
  close(): Promise<void>;
  readonly readable: ReadableStream<Uint8Array> | null;
}
interface SerialLike {
  requestPort(): Promise<SerialPortLike>;
}

function serialApi(): SerialLike | null {
  const nav = typeof navigator === 'undefined' ? null : (navigator as Navigator & { serial?: SerialLike });
  return nav?.serial ?? null;
}

/** Whether this browser can talk to a serial port at all (a secure page in a Chromium-based browser). */
export function serialSupported(): boolean {
  return serialApi() !== null;
}

/** Serial speeds balances commonly offer; 9600 is the usual factory setting (common practice). */
export const BAUD_RATES = [1200, 2400, 4800, 9600, 19200, 38400] as const;

export interface BalanceConnection {
  close(): Promise<void>;
}

/**
 * Asks for a port (must run from a click: the browser shows its own port chooser), opens it with 8 data
 * bits, no parity and 1 stop bit, the usual balance framing, and reads lines until closed. Throws when
 * the person cancels the chooser or the port cannot be opened.
 */
export async function connectBalance(options: {
  baudRate: number;
  onLine: (line: string) => void;
  onEnd: (error: Error | null) => void;
}): Promise<BalanceConnection> {
  const serial = serialApi();
  if (!serial) throw new Error('This browser cannot reach a serial port; use a Chromium-based browser on the computer the balance is plugged into.');
  const port = await serial.requestPort();
  await port.open({ baudRate: options.baudRate, dataBits: 8, stopBits: 1, parity: 'none' });
  if (!port.readable) throw new Error('The port opened but gives nothing to read.');
  // Balances send ASCII. The decoder replaces stray bytes, so line noise never stops the reader.
  const decoder = new TextDecoderStream();
  const piped = port.readable.pipeTo(decoder.writable as WritableStream<Uint8Array>).catch(() => undefined);
  const reader = decoder.readable.getReader();
  const splitter = new LineSplitter();
  let closing = false;
  void (async () => {
    try {
      for (;;) {
        const { value, done } = await reader.read();
        if (done) break;
        for (const line of splitter.push(value)) options.onLine(line);
      }
      options.onEnd(null);
    } catch (err) {
      options.onEnd(closing ? null : err instanceof Error ? err : new Error(String(err)));
    }
  })();
  return {
    async close() {
      closing = true;
      // The order the port needs: stop reading, let the pipe let go of the port, then close it.
      await reader.cancel().catch(() => undefined);
      await piped;
      await port.close().catch(() => undefined);
    },
  };
}
