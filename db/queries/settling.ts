import 'server-only';
import { db } from '@/db/knex';
import { getLabSettings } from '@/db/queries/settings';
import type { CurrentUser } from '@/lib/auth/session';
import { applyDecisionsTx, settleStateOf, type DecisionInput, type DecisionsResult, type SettleState } from './settle-core';

/* The app's side of settling (db/queries/settle-core.ts holds the queries and the transaction). */

export function getSettleState(user: CurrentUser, collectionId: number): Promise<SettleState> {
  return getLabSettings().then((settings) => settleStateOf(db, user, collectionId, settings));
}

/**
 * Stores a batch of decisions (and the settled read once all are in) in one transaction. A
 * deadlock, or the same new op id arriving twice at once (duplicate key), sends the batch round
 * again: it is idempotent, so the retry acknowledges what the other request stored.
 */
export async function saveDecisions(user: CurrentUser, collectionId: number, decisions: DecisionInput[]): Promise<DecisionsResult> {
  const settings = await getLabSettings();
  for (let attempt = 1; ; attempt++) {
    try {
      return await db.transaction((trx) => applyDecisionsTx(trx, user, collectionId, decisions, settings));
    } catch (err) {
      const code = (err as { code?: string }).code;
      if ((code !== 'ER_LOCK_DEADLOCK' && code !== 'ER_DUP_ENTRY') || attempt >= 4) throw err;
    }
  }
}
