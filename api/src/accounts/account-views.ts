import type { Account } from './account-store';
import type { SignedIn } from './session-service';

export interface AccountView {
  id: number;
  email: string;
  displayName: string;
  role: Account['role'];
  active: boolean;
  createdAt: string;
  lastSignInAt: string | null;
}

export const accountView = (account: Account): AccountView => ({
  id: account.id,
  email: account.email,
  displayName: account.displayName,
  role: account.role,
  active: account.active,
  createdAt: account.createdAt.toISOString(),
  lastSignInAt: account.lastSignInAt ? account.lastSignInAt.toISOString() : null,
});

export const sessionView = (signedIn: SignedIn) => ({
  token: signedIn.token,
  tokenType: signedIn.tokenType,
  expiresAt: signedIn.expiresAt.toISOString(),
  account: accountView(signedIn.account),
});
