import { DEFAULT_PAGE_PORT } from './page-server.js';
import type { StagePageRequest } from './stage-link.js';

/** The stage page's command-line options (`--page [PORT]`, `--page-host ADDRESS`; the demo also has `--no-page`). */
export interface StagePageCli {
  /** A port, `true` for the default, `false` from `--no-page`. */
  page?: number | boolean;
  pageHost?: string;
}

/** The page asked for on the command line, or undefined when none was. `--page-host` alone means the default port. */
export function stagePageRequest(cli: StagePageCli, about: Pick<StagePageRequest, 'pieceTitle' | 'tuningId' | 'tuningName'>, byDefault = false): StagePageRequest | undefined {
  if (cli.page === false) return undefined;
  if (cli.page === undefined && cli.pageHost === undefined && !byDefault) return undefined;
  const port = typeof cli.page === 'number' ? cli.page : DEFAULT_PAGE_PORT;
  return { port, host: cli.pageHost, anyPortIfTaken: byDefault && typeof cli.page !== 'number', ...about };
}
