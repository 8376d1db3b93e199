import type { ISignal } from '@lumino/signaling';
import type { Run } from '../../model/workbench/runs';

/** What the plots read of a workbench: its runs and the signal that one changed. */
export interface IRunSource {
  readonly runs: ReadonlyArray<Run>;
  readonly runChanged: ISignal<unknown, Run>;
}
