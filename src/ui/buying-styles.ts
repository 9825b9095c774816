// Styles the buyer's pages share (Plan, Orders, Stock and the planning settings): a row of labelled controls, and a
// block per order or suggested order.
import { css } from 'lit';

export const buyingStyles = css`
  .fieldrow {
    display: flex;
    gap: 1rem;
    align-items: end;
    flex-wrap: wrap;
    margin: 0 0 0.75rem;
  }
  .fieldrow label {
    display: grid;
    gap: 0.2rem;
    font-size: 0.9rem;
  }
  .fieldrow input,
  .fieldrow select {
    font: inherit;
    padding: 0.2rem 0.4rem;
  }
  .flag {
    white-space: nowrap;
  }
  .order {
    border-top: 1px solid var(--rule, #ccc);
    margin-top: 0.75rem;
    padding-top: 0.5rem;
  }
  .order h3 {
    font-size: 1rem;
    margin: 0 0 0.25rem;
  }
  input.qty {
    width: 7em;
    font: inherit;
    text-align: right;
  }
`;
