/**
 * Perpend's kernel bridge: lists, reads and writes numpy arrays in a live Python kernel,
 * silently and exactly, and parses arrays printed in notebook outputs when there is no
 * kernel to ask.
 *
 * ## Wiring (for the panel and plugin)
 *
 * One {@link KernelBridge} per kernel connection (`sessionContext.session.kernel`); on
 * `sessionContext.kernelChanged` dispose it and make a new one. A restart of the same kernel
 * needs no new bridge: pending requests fail with code `restarted`, and the helper and comm
 * are reinstalled on the next request.
 *
 * ```ts
 * const ledger = new SessionLedger();
 * const watch = watchKernelExecutions(kernel, ledger); // dispose with the bridge
 * const bridge = new KernelBridge({ kernel, ledger, timeoutMs, maxBytes, maxBytesSetting: 'maxArrayMiB', translator });
 * bridge.activityChanged.connect((_, a) => status.show(a.state, a.label)); // 'waiting' | 'running' | 'idle'
 * const cells = notebook.widgets.map(c => ({ cellId: c.model.id, executionCount: c.model.executionCount }));
 * const infos = [...await bridge.listCellResults(cells), ...await bridge.listVariables()];
 * const arr = await bridge.readArray(infos[0].source);          // ArrayData, C order, interleaved complex
 * const res = await bridge.writeArray('w_hat', result);          // status 'written' | 'exists' | 'shadows'
 * if (res.status !== 'written' && await confirm(res.message)) { await bridge.writeArray('w_hat', result, { overwrite: true }); }
 * ```
 *
 * - `watchKernelExecutions` feeds the ledger from the notebook's own `execute_request`s
 *   (JupyterLab puts `cellId` in their metadata) and resets it on restart; the panel may
 *   instead call `ledger.record(cellId, count)` from `NotebookActions.executed` and
 *   `ledger.reset()` on restart. With a ledger, a cell count the ledger did not record is
 *   trusted only after `verifyCells` (or `listCellResults` given each cell's `source`) finds
 *   that the kernel's raw input history for that count has the cell's SHA-256 (after a page
 *   reload); counts from an earlier kernel session fail that check (`stale-count` on read).
 * - Refresh listings after each execution (`NotebookActions.executed`) and on kernel status
 *   `idle`; while the kernel is busy a listing waits for idle and concurrent calls share one
 *   request, so calling on every event is cheap.
 * - Every failure is a {@link BridgeError}: show `e.message` (plain text, written for the
 *   user, never HTML) and keep what the panel already shows. Every sentence the bridge makes
 *   (errors, notes, the question on a taken name, warnings, activity labels) goes through the
 *   `translator` option (domain 'perpend'); without one the bridge speaks English. `e.code` is for logic, e.g.
 *   `too-large` (offer the setting), `stale-count` (offer the variable), `unsupported-kernel`
 *   / `dead` (fall back to the parsers below).
 * - Cell results come from IPython's output cache: show {@link cacheNotes}`(trans)` (English:
 *   {@link CACHE_NOTES}; `reference` beside each, `notCached` when a cell the user picks is
 *   not listed).
 * - Sample rate: `bridge.readScalar('fs')` or `bridge.readScalar('rec.fs')`.
 * - Settings the bridge expects (the lead's schema): a timeout in ms (counted from the
 *   kernel starting the request, not from queueing) and a size limit (default 512 MiB);
 *   pass the setting's name as `maxBytesSetting` so the refusal message names it.
 *
 * ## Output context-menu command (no kernel, or a non-Python kernel)
 *
 * For an output of a code cell: when a Python kernel is live and the ledger trusts the cell's
 * count, read `{ kind: 'cell', cellId, executionCount }` (full precision, even when the
 * printed repr was truncated). Otherwise parse the output's data with
 * {@link parseOutputData} (`output.data` of an `execute_result`/`display_data`, or the
 * `text` of a `stream`), then {@link parsedToArrayData}, which refuses truncated text with a
 * message saying the values are incomplete. Like a read from the kernel, these refuse integers
 * beyond ±2^53, more than two dimensions and empty arrays with the same codes
 * (`int-precision`, `ndim`, `empty`). Nothing from an output or from notebook metadata
 * is ever evaluated: the parsers tokenise numbers and brackets only.
 *
 * ## Security
 *
 * Names are validated (NFKC, identifier, not a keyword) before anything is sent
 * ({@link normalizeIdentifier}); other strings reach Python only as escaped literals
 * ({@link pyStringLiteral}); the only code run is Perpend's helper, installed silently in
 * `sys.modules` (never in the user's namespace), which calls no method of the user's objects
 * when listing or reading. The code sent to run in the user's namespace looks up no name there
 * (a user's `exec`, `__import__`, `np` or `__builtins__` changes nothing; see `helper.ts`).
 */
export { KernelBridge } from './bridge';
export { CACHE_NOTES, cacheNotes, type CacheNotes } from './notes';
export { TRANSLATION_DOMAIN, bridgeBundle, englishTranslator } from './i18n';
export type {
  ArrayData,
  ArrayInfo,
  ArraySource,
  CellRef,
  CellVerdict,
  ReadOptions,
  WriteConflict,
  WriteResult
} from './types';
export { BridgeError, isBridgeError, type BridgeErrorCode } from './errors';
export { COMM_TARGET, HELPER_MODULE, HELPER_VERSION } from './helper';
export { SessionLedger, watchKernelExecutions } from './ledger';
export {
  MAX_NAME_LENGTH,
  PYTHON_KEYWORDS,
  IPYTHON_NAMES,
  checkIdentifier,
  normalizeIdentifier,
  requireName,
  reservedName,
  pyIntLiteral,
  pyStringLiteral,
  type NameCheck
} from './names';
export {
  MAX_TEXT_LENGTH,
  checkReadable,
  parseArrayText,
  parseCsv,
  parseJsonArray,
  parseNumpyRepr,
  parseOutputData,
  parsedToArrayData,
  roundToFloat16,
  type ParsedArray
} from './parsers';
export { base64DecodedLength, decodeBase64Into, encodeBase64 } from './base64';
