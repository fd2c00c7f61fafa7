/**
 * Tests never reach the network: any socket to a host other than loopback fails at once.
 * (Unix sockets and loopback TCP — our PostgreSQL, fakes and servers — stay allowed.)
 */
import net from 'node:net';

const LOOPBACK = /^(localhost|127(?:\.\d{1,3}){3}|::1|::ffff:127(?:\.\d{1,3}){3})$/i;
const originalConnect = net.Socket.prototype.connect;

function hostOf(args: unknown[]): string | undefined {
  const first = args[0];
  if (Array.isArray(first)) return hostOf(first);
  if (typeof first === 'object' && first !== null) {
    const options = first as { host?: string; path?: string };
    if (options.path) return 'localhost';
    return options.host ?? 'localhost';
  }
  if (typeof first === 'string' && Number.isNaN(Number(first))) return 'localhost'; // a unix socket path
  return typeof args[1] === 'string' ? args[1] : 'localhost';
}

net.Socket.prototype.connect = function guardedConnect(this: net.Socket, ...args: unknown[]) {
  const host = hostOf(args);
  if (host && !LOOPBACK.test(host)) {
    throw new Error(`Outbound network is blocked in tests (tried to reach ${host}).`);
  }
  return (originalConnect as (...a: unknown[]) => net.Socket).apply(this, args);
} as typeof net.Socket.prototype.connect;
