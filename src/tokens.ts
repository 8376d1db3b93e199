import { Token } from '@lumino/coreutils';
import type { ISignal } from '@lumino/signaling';
import type { LoadedArraysModel } from './model/loaded';
import type { SourcesModel } from './model/sources';

/** Settings read by Perpend (schema/plugin.json). */
export interface IPerpendSettings {
  requestTimeoutSeconds: number;
  maxArrayMiB: number;
  keepReadMiB: number;
  refreshAfterExecution: boolean;
}

/** Defaults, identical to schema/plugin.json. */
export const DEFAULT_SETTINGS: IPerpendSettings = {
  requestTimeoutSeconds: 60,
  maxArrayMiB: 512,
  keepReadMiB: 256,
  refreshAfterExecution: true
};

/** The running Perpend instance, for other extensions. */
export interface IPerpend {
  /** The array sources of the active notebook. */
  readonly sources: SourcesModel;
  /** The arrays brought into the panel. */
  readonly loaded: LoadedArraysModel;
  /** Emitted when the settings change. */
  readonly settingsChanged: ISignal<IPerpend, IPerpendSettings>;
  /**
   * The settings applied last: the defaults until they are loaded. A plugin that activates
   * after the settings were loaded starts from these (it has missed the first emission).
   */
  readonly settings: IPerpendSettings;
}

export const IPerpend = new Token<IPerpend>('perpend:IPerpend', 'The Perpend workbench.');

/** Perpend's command ids (menus and shortcuts refer to them in schema/plugin.json). */
export namespace CommandIDs {
  /** Show the side panel. */
  export const open = 'perpend:open';
  /** List the active notebook's arrays again. */
  export const refresh = 'perpend:refresh-arrays';
  /** Bring in the output under the context menu. */
  export const sendOutput = 'perpend:send-output';
  /** Bring in the array output of the notebook's active cell (keyboard). */
  export const sendCellOutput = 'perpend:send-cell-output';
}
