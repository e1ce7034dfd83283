import type { Sequelize } from 'sequelize';
import type { AccountModels } from '../accounts/account-models';
import type { KeyModels } from '../keys/key-models';
import type { Role } from '../auth/principal';
import { problems } from '../http/problem';
import { findAccount, listAccounts, revokeSessionsOf, updateAccount, type Account } from '../accounts/account-store';
import { revokeKeysOf } from '../keys/key-store';

export function userAdminService(sequelize: Sequelize, models: AccountModels & KeyModels) {
  return {
    list(filter: { role?: Role; active?: boolean }): Promise<Account[]> {
      return listAccounts(models, filter);
    },

    /**
     * Changes a user's role or deactivates (or reactivates) them. Deactivating ends their sessions and
     * revokes their partner keys. Admins cannot change themselves, so the last admin cannot lock everyone out.
     */
    async change(adminId: number, userId: number, changes: { role?: Role; active?: boolean }): Promise<Account> {
      if (userId === adminId) throw problems.conflict('Admins cannot change their own role or deactivate themselves; ask another admin.');
      const account = await findAccount(models, userId);
      if (!account) throw problems.notFound(`There is no user ${userId}.`);
      await sequelize.transaction(async (transaction) => {
        await updateAccount(models, userId, changes, transaction);
        if (changes.active === false) await revokeSessionsOf(models, userId, new Date(), transaction);
      });
      if (changes.active === false) await revokeKeysOf(models, userId, adminId, new Date());
      const updated = await findAccount(models, userId);
      if (!updated) throw problems.notFound(`There is no user ${userId}.`);
      return updated;
    },
  };
}

export type UserAdminService = ReturnType<typeof userAdminService>;
