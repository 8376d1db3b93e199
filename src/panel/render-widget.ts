import { Widget } from '@lumino/widgets';
import type { Message } from '@lumino/messaging';

/**
 * A widget that repaints only in onUpdateRequest (so a burst of model changes conflates into one
 * paint) and only while visible: an update asked for while hidden is remembered and done when
 * the widget is shown again.
 */
export abstract class RenderWidget extends Widget {
  /** Paints the widget from its model. */
  protected abstract render(): void;

  protected onAfterShow(_msg: Message): void {
    if (this._stale) {
      this.update();
    }
  }

  protected onUpdateRequest(_msg: Message): void {
    if (!this.isVisible) {
      this._stale = true;
      return;
    }
    this._stale = false;
    this.render();
  }

  private _stale = false;
}
