// What every view of the Compare page is given: the Book, the variants compared (as many as are drawn), and the
// page's CompareController with its revision, which moves whenever a figure may have, so the view draws again.
import { LitElement } from 'lit';
import { property } from 'lit/decorators.js';
import type { Book, Variant } from '../domain/book.ts';
import type { CompareController } from './compare-controller.ts';

export class CompareView extends LitElement {
  @property({ attribute: false }) book: Book | undefined;
  @property({ attribute: false }) chosen: Variant[] = [];
  @property({ attribute: false }) costs: CompareController | undefined;
  @property({ attribute: false }) revision = 0;
}
