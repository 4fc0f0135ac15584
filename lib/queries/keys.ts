// Every react-query key in one place, one factory per resource, so that a mutation invalidates
// exactly what it changes and nobody spells a key by hand.
export const authKeys = {
  all: ['auth'] as const,
  me: () => [...authKeys.all, 'me'] as const,
  demo: () => [...authKeys.all, 'demo'] as const,
  invitation: (token: string) => [...authKeys.all, 'invitation', token] as const,
};

export const projectKeys = {
  all: ['projects'] as const,
  list: (teamId: string | null) => [...projectKeys.all, 'list', teamId] as const,
};

export const designKeys = {
  all: ['designs'] as const,
  lists: () => [...designKeys.all, 'list'] as const,
  list: (teamId: string | null, search: string) => [...designKeys.lists(), teamId, search] as const,
  detail: (id: string) => [...designKeys.all, 'detail', id] as const,
  revisions: (id: string) => [...designKeys.all, 'revisions', id] as const,
};

export const revisionKeys = {
  all: ['revisions'] as const,
  detail: (id: string) => [...revisionKeys.all, 'detail', id] as const,
  analyses: (id: string) => [...revisionKeys.all, 'analyses', id] as const,
};

export const reviewKeys = {
  all: ['reviews'] as const,
  lists: () => [...reviewKeys.all, 'list'] as const,
  list: (teamId: string | null, scope: string) => [...reviewKeys.lists(), teamId, scope] as const,
  detail: (id: string) => [...reviewKeys.all, 'detail', id] as const,
  forDesign: (designId: string) => [...reviewKeys.all, 'design', designId] as const,
};

export const adminKeys = {
  all: ['admin'] as const,
  members: (teamId: string | null) => [...adminKeys.all, 'members', teamId] as const,
  invitations: (teamId: string | null) => [...adminKeys.all, 'invitations', teamId] as const,
  policy: (teamId: string | null) => [...adminKeys.all, 'policy', teamId] as const,
  outbox: (teamId: string | null) => [...adminKeys.all, 'outbox', teamId] as const,
  audit: (teamId: string | null) => [...adminKeys.all, 'audit', teamId] as const,
};

export const mailKeys = {
  all: ['mail'] as const,
  mine: () => [...mailKeys.all, 'mine'] as const,
};

export const prechargeKeys = {
  all: ['precharge'] as const,
  sizing: (inputsHash: string) => [...prechargeKeys.all, 'size', inputsHash] as const,
};
