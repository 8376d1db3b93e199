/**
 * The set-up editor: one tool's form, built from the field descriptions of the model. What the
 * user types is kept as typed; a bad value is marked on its field with the reason and nothing is
 * saved or run until every field is right. The editor computes nothing: it asks the model to
 * validate.
 */
import { Widget } from '@lumino/widgets';
import type { TranslationBundle } from '@jupyterlab/translation';
import { basisDraft, type KernelHints } from '../../model/workbench/drafts';
import {
  fieldsOf,
  getPath,
  parseNumberList,
  setPath,
  TOOL_LABELS,
  type FieldSpec
} from '../../model/workbench/fields';
import type { FieldIssue } from '../../model/workbench/rules';
import type { RateRef, SetupParams, SourcePick } from '../../model/workbench/setup';
import { refKey, type ISourceCatalog, type SourceOption } from '../../model/workbench/catalog';
import { refShortName } from '../../model/workbench/sources-check';
import { formatShape } from '../format';

/** The four ways a 2-D source can hold its samples (DESIGN §3: K×N, samples along the last axis). */
const LAYOUTS = [
  ['1:trials', 'samples along axis 1; rows are trials'],
  ['1:channels', 'samples along axis 1; rows are channels'],
  ['0:trials', 'samples along axis 0; columns are trials'],
  ['0:channels', 'samples along axis 0; columns are channels']
] as const;

export class SetupEditor extends Widget {
  constructor(options: SetupEditor.IOptions) {
    super();
    this.addClass('pp-Editor');
    this._trans = options.trans;
    this._catalog = options.catalog;
    this._validate = options.validate;
    this._save = options.save;
    this._close = options.close;
    this._hints = options.hints ?? (() => ({}));
    this._catalog.changed.connect(this._onCatalog, this);
    this.node.addEventListener('focusout', ev => this._onFocusOut(ev));
  }

  dispose(): void {
    this._catalog.changed.disconnect(this._onCatalog, this);
    super.dispose();
  }

  /** The id of the set-up being edited (null for a new one). */
  get setupId(): string | null {
    return this._setupId;
  }

  /** True while the form holds edits not yet saved. */
  get dirty(): boolean {
    return this._dirty;
  }

  /** Opens `params` in the form (a new set-up when `setupId` is null). */
  edit(params: SetupParams, title: string, setupId: string | null): void {
    this._draft = JSON.parse(JSON.stringify(params));
    this._title = title;
    this._setupId = setupId;
    this._raw.clear();
    this._local.clear();
    this._issues = [];
    this._dirty = false;
    this._render();
  }

  /** Shows a line instead of a form while a new set-up's form is being prepared. */
  prepare(text: string): void {
    this._draft = null;
    this._setupId = null;
    this._dirty = false;
    const p = document.createElement('p');
    p.className = 'pp-Workbench-hint pp-Editor-preparing';
    p.textContent = text;
    this.node.replaceChildren(p);
  }

  /** Marks the given issues on their fields (after a failed save, say). */
  showIssues(issues: ReadonlyArray<FieldIssue>): void {
    this._issues = [...issues];
    this._render();
    this._focusFirstIssue();
  }

  /**
   * A line saying why the pickers offer nothing yet (the kernel is being listed, the listing
   * failed, no kernel), with a button to list again; null when the listing is current.
   */
  private _listingLine(): HTMLElement | null {
    const trans = this._trans;
    const st = this._catalog.state?.() ?? { state: 'listed' as const, message: '' };
    const empty = this._catalog.options().length === 0;
    // A refresh under way while arrays are listed says nothing (the list stays usable).
    if (!empty && (st.state === 'listed' || st.state === 'busy')) {
      return null;
    }
    const line = document.createElement('div');
    line.className = 'pp-Editor-listing';
    line.dataset.state = st.state;
    line.setAttribute('role', 'status');
    const text = document.createElement('span');
    text.textContent =
      st.state === 'listed'
        ? trans.__(
            'The kernel holds no array Perpend can read: run the cells that make them, then list again.'
          )
        : st.message;
    line.append(text);
    if (this._catalog.relist && st.state !== 'busy') {
      const again = document.createElement('button');
      again.type = 'button';
      again.className = 'jp-Button jp-mod-styled jp-mod-reject';
      again.textContent = trans.__('List the arrays again');
      again.addEventListener('click', () => this._catalog.relist?.());
      line.append(again);
    }
    return line;
  }

  /** What the form shows of the catalog: its options and the listing line. */
  private _catalogKey(): string {
    const line = this._listingLine();
    return JSON.stringify([
      this._catalog.options().map(o => [refKey(o.ref), o.label, o.shape, o.dtype]),
      line ? [line.dataset.state, line.textContent] : null
    ]);
  }

  private _render(): void {
    this._shownCatalog = this._catalogKey();
    const trans = this._trans;
    const p = this._draft;
    if (!p) {
      this.node.replaceChildren();
      return;
    }
    const form = document.createElement('form');
    form.noValidate = true;
    form.addEventListener('submit', ev => {
      ev.preventDefault();
      this.submit(true);
    });
    const head = document.createElement('div');
    head.className = 'pp-Editor-head';
    const tool = document.createElement('span');
    tool.className = 'pp-Editor-tool';
    tool.textContent = trans.__(TOOL_LABELS[p.tool]);
    const title = document.createElement('input');
    title.type = 'text';
    title.className = 'pp-Editor-title jp-mod-styled';
    title.maxLength = 120;
    title.value = this._title;
    title.placeholder = trans.__('name this set-up');
    title.setAttribute('aria-label', trans.__('set-up name'));
    title.addEventListener('input', () => {
      this._title = title.value;
      this._dirty = true;
    });
    head.append(tool, title);
    const listing = this._listingLine();

    const shown = new Set<string>();
    const main = document.createElement('div');
    main.className = 'pp-Editor-fields';
    const more = document.createElement('details');
    more.className = 'pp-Editor-more';
    more.open = this._moreOpen;
    more.addEventListener('toggle', () => (this._moreOpen = more.open));
    const summary = document.createElement('summary');
    summary.textContent = trans.__('More settings');
    more.append(summary);
    const moreBody = document.createElement('div');
    moreBody.className = 'pp-Editor-fields';
    more.append(moreBody);
    for (const f of fieldsOf(p.tool)) {
      if (f.when && !f.when(p)) {
        continue;
      }
      shown.add(f.path);
      (f.more ? moreBody : main).append(this._row(f));
    }
    // A problem in a folded field opens the fold, so the mark is seen.
    if (this._issues.some(i => fieldsOf(p.tool).find(f => f.path === i.field)?.more)) {
      more.open = true;
    }
    const loose = this._issues.filter(i => !shown.has(i.field));
    const banner = document.createElement('div');
    banner.className = 'pp-Editor-issues';
    banner.setAttribute('role', 'alert');
    for (const i of loose) {
      const line = document.createElement('div');
      line.textContent = i.message;
      banner.append(line);
    }
    const foot = document.createElement('div');
    foot.className = 'pp-Editor-foot';
    foot.append(
      this._button(trans.__('Save and run'), 'pp-mod-accept', true, () => this.submit(true)),
      this._button(trans.__('Save'), '', false, () => this.submit(false)),
      this._button(trans.__('Close'), '', false, () => this._close())
    );
    form.append(head, ...(listing ? [listing] : []), banner, main);
    if (moreBody.childElementCount > 0) {
      form.append(more);
    }
    form.append(foot);
    this.node.replaceChildren(form);
  }

  private _row(f: FieldSpec): HTMLElement {
    const trans = this._trans;
    const row = document.createElement('div');
    row.className = 'pp-Field';
    row.dataset.path = f.path;
    const id = `pp-f-${this.id || 'e'}-${f.path.replace(/\./g, '-')}`;
    const label = document.createElement('label');
    label.className = 'pp-Field-label';
    label.htmlFor = id;
    label.textContent = trans.__(f.label);
    const control = this._control(f, id);
    const box = document.createElement('div');
    box.className = 'pp-Field-box';
    box.append(control);
    if (f.unit) {
      const unit = document.createElement('span');
      unit.className = 'pp-Field-unit';
      unit.textContent = trans.__(f.unit);
      box.append(unit);
    }
    row.append(label, box);
    const message = this._local.get(f.path) ?? this._issues.find(i => i.field === f.path)?.message;
    const note = document.createElement('div');
    note.id = `${id}-note`;
    if (message) {
      row.classList.add('pp-mod-invalid');
      note.className = 'pp-Field-error';
      note.textContent = message;
      control.setAttribute('aria-invalid', 'true');
    } else {
      note.className = 'pp-Field-help';
      note.textContent = f.help ? trans.__(f.help) : '';
    }
    control.setAttribute('aria-describedby', note.id);
    row.append(note);
    return row;
  }

  private _control(f: FieldSpec, id: string): HTMLElement {
    const p = this._draft!;
    const value = getPath(p, f.path);
    switch (f.kind) {
      case 'number':
      case 'optional-number':
      case 'numbers':
      case 'rate': {
        const input = document.createElement('input');
        input.type = 'text';
        input.id = id;
        input.className = 'jp-mod-styled pp-Field-input';
        input.inputMode = f.kind === 'rate' ? 'text' : 'decimal';
        input.spellcheck = false;
        input.value = this._raw.get(f.path) ?? textOf(f, value);
        input.addEventListener('input', () => this._typed(f, input.value));
        // Only the field's own note changes on leaving it: a repaint here would replace the
        // button the user is clicking.
        input.addEventListener('change', () => this._markRow(f));
        return input;
      }
      case 'choice': {
        const select = document.createElement('select');
        select.id = id;
        select.className = 'jp-mod-styled pp-Field-input';
        for (const [v, l] of f.options ?? []) {
          select.append(new Option(this._trans.__(l), v, false, v === value));
        }
        select.addEventListener('change', () => {
          this._dirty = true;
          this._clearIssue(f.path);
          // The draft as it is now (a layout or a typed value may have changed it since this
          // control was drawn), not as it was then.
          const now = this._draft!;
          if (f.path === 'basis.kind' && now.tool === 'removal') {
            this._draft = { ...now, basis: basisDraft(select.value as never, this._hints()) };
          } else {
            this._draft = setPath(now, f.path, select.value);
          }
          this._render();
          this._focus(f.path);
        });
        return select;
      }
      case 'toggle': {
        const box = document.createElement('input');
        box.type = 'checkbox';
        box.id = id;
        box.checked = value === true;
        box.addEventListener('change', () => {
          this._dirty = true;
          this._draft = setPath(this._draft!, f.path, box.checked);
        });
        return box;
      }
      case 'source':
        return this._sourceControl(f, id, value as SourcePick);
    }
  }

  private _sourceControl(f: FieldSpec, id: string, pick: SourcePick): HTMLElement {
    const trans = this._trans;
    const wrap = document.createElement('div');
    wrap.className = 'pp-Field-source';
    const select = document.createElement('select');
    select.id = id;
    select.className = 'jp-mod-styled pp-Field-input';
    const options = this._catalog.options();
    const current =
      pick && !(pick.ref.kind === 'variable' && pick.ref.name === '') ? refKey(pick.ref) : '';
    select.append(
      new Option(
        f.optional ? trans.__('none') : trans.__('choose an array…'),
        '',
        false,
        current === ''
      )
    );
    let listed = false;
    // The kernel's arrays first, then the panel's (results computed there), each in a group.
    const kernelGroup = document.createElement('optgroup');
    kernelGroup.label = trans.__('In the kernel');
    const shelfGroup = document.createElement('optgroup');
    shelfGroup.label = trans.__('On the Perpend panel (this page only)');
    for (const o of options) {
      const key = refKey(o.ref);
      listed ||= key === current;
      (o.ref.kind === 'shelf' ? shelfGroup : kernelGroup).append(
        new Option(optionText(trans, o), key, false, key === current)
      );
    }
    for (const g of [kernelGroup, shelfGroup]) {
      if (g.childElementCount > 0) {
        select.append(g);
      }
    }
    if (current && !listed) {
      // The set-up names a source the kernel does not list now: keep it, and say so.
      const label = refShortName(trans, pick.ref);
      select.append(new Option(trans.__('%1 (not listed now)', label), current, false, true));
    }
    select.addEventListener('change', () => {
      this._dirty = true;
      this._clearIssue(f.path);
      const o = options.find(x => refKey(x.ref) === select.value);
      const next: SourcePick | undefined = o
        ? {
            ref: o.ref,
            shape: [...o.shape],
            layout: o.shape.length === 2 ? { samplesAxis: 1, rows: 'trials' } : null
          }
        : f.optional
          ? undefined
          : { ref: { kind: 'variable', name: '' }, shape: null, layout: null };
      this._draft = setPath(this._draft!, f.path, next);
      this._render();
      this._focus(f.path);
    });
    wrap.append(select);
    if (pick?.shape && pick.shape.length === 2) {
      const layout = document.createElement('select');
      layout.className = 'jp-mod-styled pp-Field-layout';
      layout.setAttribute(
        'aria-label',
        trans.__('%1: which axis holds the samples', trans.__(f.label))
      );
      const now = pick.layout ? `${pick.layout.samplesAxis}:${pick.layout.rows}` : '1:trials';
      for (const [v, l] of LAYOUTS) {
        layout.append(new Option(trans.__(l), v, false, v === now));
      }
      layout.addEventListener('change', () => {
        const [axis, rows] = layout.value.split(':');
        this._dirty = true;
        this._draft = setPath(this._draft!, `${f.path}.layout`, {
          samplesAxis: Number(axis) as 0 | 1,
          rows: rows as 'trials' | 'channels'
        });
      });
      wrap.append(layout);
    }
    return wrap;
  }

  /** Keeps the text as typed, parses it into the draft, and notes a text that is no value. */
  private _typed(f: FieldSpec, text: string): void {
    this._dirty = true;
    this._raw.set(f.path, text);
    this._clearIssue(f.path);
    this._local.delete(f.path);
    const t = text.trim();
    let value: unknown;
    switch (f.kind) {
      case 'number':
        value = t === '' ? NaN : Number(t);
        if (t !== '' && !Number.isFinite(value as number)) {
          this._local.set(f.path, this._trans.__('"%1" is not a number.', t));
        }
        break;
      case 'optional-number':
        value = t === '' ? null : Number(t);
        if (t !== '' && !Number.isFinite(value as number)) {
          this._local.set(f.path, this._trans.__('"%1" is not a number.', t));
        }
        break;
      case 'numbers': {
        const r = parseNumberList(t);
        if (typeof r === 'string') {
          this._local.set(f.path, this._trans.__(r));
          value = [];
        } else {
          value = r;
        }
        break;
      }
      case 'rate':
        value = parseRate(t);
        if (value === undefined) {
          this._local.set(
            f.path,
            this._trans.__('Type the sample rate in Hz (4000) or a kernel variable (fs, rec.fs).')
          );
          value = null;
        }
        break;
      default:
        return;
    }
    this._draft = setPath(this._draft!, f.path, value);
  }

  /** Shows the field's parse error (or its help) in place, leaving the input alone. */
  private _markRow(f: FieldSpec): void {
    const row = this.node.querySelector<HTMLElement>(`.pp-Field[data-path="${f.path}"]`);
    const note = row?.querySelector<HTMLElement>('.pp-Field-error, .pp-Field-help');
    const control = row?.querySelector<HTMLElement>('input, select');
    if (!row || !note || !control) {
      return;
    }
    const message = this._local.get(f.path);
    row.classList.toggle('pp-mod-invalid', !!message);
    note.className = message ? 'pp-Field-error' : 'pp-Field-help';
    note.textContent = message ?? (f.help ? this._trans.__(f.help) : '');
    if (message) {
      control.setAttribute('aria-invalid', 'true');
    } else {
      control.removeAttribute('aria-invalid');
    }
  }

  /** Checks the form, then saves it (and runs it); marks the fields when it may not. */
  submit(run: boolean): void {
    if (!this._draft) {
      return;
    }
    const local = [...this._local].map(([field, message]) => ({ field, message }));
    const issues = local.length > 0 ? local : this._validate(this._draft);
    if (issues.length > 0) {
      this.showIssues(issues);
      return;
    }
    const refused = this._save(this._draft, this._title.trim(), this._setupId, run);
    if (refused && refused.length > 0) {
      this.showIssues(refused);
      return;
    }
    this._dirty = false;
  }

  /**
   * The listing changed: the pickers must offer what the kernel holds now, even while the user
   * types the set-up's name or a value (the form is repainted and the caret put back where it
   * was). Only an open picker is left alone until it loses the focus.
   */
  private _onCatalog(): void {
    if (!this._draft) {
      return;
    }
    // Only a change the form shows repaints it (a listing's state passes often).
    const seen = this._catalogKey();
    if (seen === this._shownCatalog) {
      return;
    }
    const active = document.activeElement as HTMLElement | null;
    if (!active || !this.node.contains(active)) {
      this._render();
      return;
    }
    if (active instanceof HTMLSelectElement) {
      this._catalogStale = true;
      return;
    }
    const path = active.closest<HTMLElement>('.pp-Field')?.dataset.path;
    const isTitle = active.classList.contains('pp-Editor-title');
    const caret =
      active instanceof HTMLInputElement && active.type === 'text'
        ? [active.selectionStart, active.selectionEnd]
        : null;
    this._render();
    const again = isTitle
      ? this.node.querySelector<HTMLInputElement>('.pp-Editor-title')
      : path
        ? this.node.querySelector<HTMLInputElement>(`.pp-Field[data-path="${path}"] input`)
        : null;
    again?.focus();
    if (again && caret && caret[0] !== null && caret[1] !== null && again.type === 'text') {
      again.setSelectionRange(caret[0], caret[1]);
    }
  }

  /** An open picker lost the focus after the listing changed: repaint then (see _onCatalog). */
  private _onFocusOut(ev: FocusEvent): void {
    if (!this._catalogStale || !(ev.target instanceof HTMLSelectElement)) {
      return;
    }
    this._catalogStale = false;
    const next = ev.relatedTarget as HTMLElement | null;
    const path =
      next && this.node.contains(next)
        ? next.closest<HTMLElement>('.pp-Field')?.dataset.path
        : undefined;
    // After the focus has moved (the DOM is not changed inside a focus event).
    setTimeout(() => {
      if (this.isDisposed || !this._draft) {
        return;
      }
      this._render();
      if (path) {
        this._focus(path);
      }
    }, 0);
  }

  private _clearIssue(path: string): void {
    this._issues = this._issues.filter(i => i.field !== path);
  }

  private _focus(path: string): void {
    const el = this.node.querySelector<HTMLElement>(
      `.pp-Field[data-path="${path}"] select, .pp-Field[data-path="${path}"] input`
    );
    el?.focus();
  }

  private _focusFirstIssue(): void {
    this.node.querySelector<HTMLElement>('[aria-invalid="true"]')?.focus();
  }

  private _button(label: string, cls: string, primary: boolean, fn: () => void): HTMLButtonElement {
    const b = document.createElement('button');
    b.type = primary ? 'submit' : 'button';
    b.className =
      `jp-Button jp-mod-styled ${primary ? 'jp-mod-accept' : 'jp-mod-reject'} ${cls}`.trim();
    b.textContent = label;
    if (!primary) {
      b.addEventListener('click', fn);
    }
    return b;
  }

  private readonly _trans: TranslationBundle;
  private readonly _catalog: ISourceCatalog;
  private _catalogStale = false;
  private _shownCatalog = '';
  private readonly _validate: (p: SetupParams) => FieldIssue[];
  private readonly _save: SetupEditor.SaveFn;
  private readonly _close: () => void;
  private readonly _hints: () => KernelHints;
  private _draft: SetupParams | null = null;
  private _title = '';
  private _setupId: string | null = null;
  private _raw = new Map<string, string>();
  private _local = new Map<string, string>();
  private _issues: FieldIssue[] = [];
  private _dirty = false;
  private _moreOpen = false;
}

export namespace SetupEditor {
  /** Saves (and runs); returns issues when the model refuses. */
  export type SaveFn = (
    params: SetupParams,
    title: string,
    setupId: string | null,
    run: boolean
  ) => FieldIssue[] | null;

  export interface IOptions {
    trans: TranslationBundle;
    catalog: ISourceCatalog;
    validate: (p: SetupParams) => FieldIssue[];
    save: SaveFn;
    close: () => void;
    hints?: () => KernelHints;
  }
}

/** The text a stored value shows as in its field. */
function textOf(f: FieldSpec, v: unknown): string {
  if (f.kind === 'rate') {
    const r = v as RateRef | null;
    return r === null || r === undefined ? '' : r.kind === 'hz' ? String(r.value) : r.name;
  }
  if (f.kind === 'numbers') {
    return Array.isArray(v) ? v.join(', ') : '';
  }
  return v === null || v === undefined || (typeof v === 'number' && Number.isNaN(v))
    ? ''
    : String(v);
}

/** A sample rate as typed: '' → null, a number → Hz, a dotted name → variable; else undefined. */
export function parseRate(t: string): RateRef | null | undefined {
  if (t === '') {
    return null;
  }
  const n = Number(t);
  if (Number.isFinite(n)) {
    return { kind: 'hz', value: n };
  }
  return /^[A-Za-z_][A-Za-z0-9_]*(\.[A-Za-z_][A-Za-z0-9_]*)*$/.test(t)
    ? { kind: 'variable', name: t }
    : undefined;
}

function optionText(trans: TranslationBundle, o: SourceOption): string {
  return trans.__('%1 · %2 %3', o.label, formatShape(o.shape), o.dtype);
}
