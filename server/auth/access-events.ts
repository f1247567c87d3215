import { EventEmitter } from 'node:events';

/**
 * Changes that must end access at once, from the admin routes to whoever holds live sessions:
 * the broker (device connections and its login cache) and live push (users' sockets).
 */
export class AccessEvents {
  private readonly emitter = new EventEmitter().setMaxListeners(50);

  /** A user was disabled, or their role or password changed: end their open sessions. */
  userChanged(userId: number): void {
    this.emitter.emit('user', userId);
  }

  /** A user's sites changed: their sessions stay (HTTP reads the sites per request), open sockets are re-scoped. */
  sitesChanged(userId: number): void {
    this.emitter.emit('sites', userId);
  }

  onSitesChanged(listener: (userId: number) => void): void {
    this.emitter.on('sites', listener);
  }

  /** A device was revoked or its secret rotated: close its connections, forget cached logins. */
  deviceChanged(deviceId: number): void {
    this.emitter.emit('device', deviceId);
  }

  onUserChanged(listener: (userId: number) => void): void {
    this.emitter.on('user', listener);
  }

  onDeviceChanged(listener: (deviceId: number) => void): void {
    this.emitter.on('device', listener);
  }
}
