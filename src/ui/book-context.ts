// How pages reach the open Book: the shell provides the BookService through a Lit context, and BookController
// consumes it and re-renders its host whenever the Book, the save state or the storage figures change.
import { ContextConsumer, createContext } from '@lit/context';
import type { LitElement, ReactiveController } from 'lit';
import type { Book } from '../domain/book.ts';
import type { BookService } from './book-service.ts';

export const bookContext = createContext<BookService>(Symbol('rungbook-book-service'));

export class BookController implements ReactiveController {
  service: BookService | undefined;
  private readonly onChange = (): void => this.host.requestUpdate();

  constructor(private readonly host: LitElement) {
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

  hostConnected(): void {
    this.service?.addEventListener('change', this.onChange);
    // A page shown again may have missed changes while it was away (a replaced Book): it draws from the Book now.
    if (this.service) this.host.requestUpdate();
  }

  hostDisconnected(): void {
    this.service?.removeEventListener('change', this.onChange);
  }

  private attach(service: BookService): void {
    if (service === this.service) return;
    this.service?.removeEventListener('change', this.onChange);
    this.service = service;
    if (this.host.isConnected) service.addEventListener('change', this.onChange);
    this.host.requestUpdate();
  }
}
