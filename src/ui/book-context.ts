// How pages reach the open Book: the shell provides the BookService through a Lit context, and BookController
// consumes it and re-renders its host whenever the Book, the save state or the storage figures change — and, for a
// page that shows figures (`{ figures: true }`), whenever the live figures worked out off the page's thread arrive.
import { ContextConsumer, createContext } from '@lit/context';
import type { LitElement, ReactiveController } from 'lit';
import type { Book } from '../domain/book.ts';
import type { BookService } from './book-service.ts';
import { CostingService } from './costing-service.ts';

export const bookContext = createContext<BookService>(Symbol('rungbook-book-service'));

export class BookController implements ReactiveController {
  service: BookService | undefined;
  private readonly onChange = (): void => this.host.requestUpdate();

  constructor(
    private readonly host: LitElement,
    private readonly options: { figures?: boolean } = {},
  ) {
    new ContextConsumer(host, {
      context: bookContext,
      subscribe: true,
      callback: (service) => this.attach(service),
    });
    host.addController(this);
  }

  get book(): Book | undefined {
    return this.service?.book;
  }

  /** The service whose changes redraw the host: the Book's, and its figures' when asked for. */
  private listen(service: BookService, on: boolean): void {
    const targets: EventTarget[] = [service];
    if (this.options.figures) targets.push(CostingService.for(service));
    for (const t of targets) {
      if (on) t.addEventListener('change', this.onChange);
      else t.removeEventListener('change', this.onChange);
    }
  }

  hostConnected(): void {
    if (this.service) this.listen(this.service, true);
    // A page shown again may have missed changes while it was away (a replaced Book): it draws from the Book now.
    if (this.service) this.host.requestUpdate();
  }

  hostDisconnected(): void {
    if (this.service) this.listen(this.service, false);
  }

  private attach(service: BookService): void {
    if (service === this.service) return;
    if (this.service) this.listen(this.service, false);
    this.service = service;
    if (this.host.isConnected) this.listen(service, true);
    this.host.requestUpdate();
  }
}
