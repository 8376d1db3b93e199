import fs from 'node:fs';
import { STATE_FILE, stopPid, type ILabState } from './lab-server';

export default async function globalTeardown(): Promise<void> {
  if (fs.existsSync(STATE_FILE)) {
    const state = JSON.parse(fs.readFileSync(STATE_FILE, 'utf8')) as ILabState;
    stopPid(state.pid);
    fs.rmSync(STATE_FILE, { force: true });
  }
}
