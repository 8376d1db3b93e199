import fs from 'node:fs';
import { STATE_FILE, startLab } from './lab-server';

/** One real `jupyter lab` for all browser tests; its PID and URL go to a state file. */
export default async function globalSetup(): Promise<void> {
  const { state, child } = await startLab();
  child.unref();
  fs.writeFileSync(STATE_FILE, JSON.stringify(state));
}
