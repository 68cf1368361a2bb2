import { roleAtLeast, type Role } from '../constants/roles';
import { FINDING_ACTIONS, type FindingAction, type FindingState } from '../constants/findings';

/**
 * The review of a finding as a pure state machine. The server enforces it; the client uses the same
 * function to show only the buttons that apply.
 *
 *   draft ──submit──▶ in-review ──approve──▶ approved ──revise──▶ (a new version, itself a draft)
 *     ▲                   │
 *     └──reopen── returned ◀──return──┘
 *   draft, returned ──withdraw──▶ withdrawn
 *
 * `edit`, `attach` and `comment` do not move the state; `revise` starts a new version and leaves the
 * approved one as it is (approved content never changes).
 */
const MOVES: Record<FindingAction, { from: readonly FindingState[]; to: FindingState | null }> = {
  edit: { from: ['draft'], to: null },
  attach: { from: ['draft'], to: null },
  submit: { from: ['draft'], to: 'in-review' },
  comment: { from: ['draft', 'in-review', 'returned'], to: null },
  return: { from: ['in-review'], to: 'returned' },
  approve: { from: ['in-review'], to: 'approved' },
  reopen: { from: ['returned'], to: 'draft' },
  withdraw: { from: ['draft', 'returned'], to: 'withdrawn' },
  revise: { from: ['approved'], to: null },
};

/** The state after `action`, or null when the action does not apply in `state`. Actions that do not move return `state`. */
export function nextState(state: FindingState, action: FindingAction): FindingState | null {
  const move = MOVES[action];
  if (!move.from.includes(state)) return null;
  return move.to ?? state;
}

/** The least role for each action. Viewers only read. */
const LEAST_ROLE: Record<FindingAction, Role> = {
  edit: 'technician',
  attach: 'technician',
  submit: 'technician',
  comment: 'technician',
  return: 'reviewer',
  approve: 'reviewer',
  reopen: 'technician',
  withdraw: 'technician',
  revise: 'technician',
};

/** What the rules need to know about a finding. */
export interface ReviewSubject {
  state: FindingState;
  /** Who created this version. */
  authorId: number;
  /** Everyone who saved an edit of this version (the author included when they edited). */
  editorIds: readonly number[];
  /** True when a later version already replaces this one (or is being written). */
  hasNewerVersion?: boolean;
}

export interface Actor {
  id: number;
  role: Role;
}

export type Decision = { allowed: true; next: FindingState } | { allowed: false; reason: string; status: 403 | 409 };

const stateWords: Record<FindingState, string> = {
  draft: 'a draft',
  'in-review': 'in review',
  returned: 'returned to its author',
  approved: 'approved',
  withdrawn: 'withdrawn',
};

/**
 * May `actor` do `action` to `finding`? Checks, in this order: the state (409 when the action does not
 * apply there; approved content is immutable), the role, then who the actor is:
 * - separation of duties: the author of the version, or anyone who edited it, may neither approve nor
 *   return it — a reviewer judges someone else's work;
 * - only the author (or an admin) withdraws a finding; only the author or an editor reopens it.
 */
export function decide(finding: ReviewSubject, actor: Actor, action: FindingAction): Decision {
  const next = nextState(finding.state, action);
  if (next === null) {
    const reason =
      finding.state === 'approved' && action !== 'revise'
        ? 'This finding is approved and can no longer change; start a new version instead'
        : `Cannot ${action} a finding that is ${stateWords[finding.state]}`;
    return { allowed: false, reason, status: 409 };
  }
  if (action === 'revise' && finding.hasNewerVersion) {
    return { allowed: false, reason: 'A newer version of this finding already exists', status: 409 };
  }
  const least = LEAST_ROLE[action];
  if (!roleAtLeast(actor.role, least)) return { allowed: false, reason: `This needs the ${least} role or higher`, status: 403 };

  const isAuthor = finding.authorId === actor.id;
  const isEditor = finding.editorIds.includes(actor.id);
  if (action === 'approve' || action === 'return') {
    if (isAuthor) return { allowed: false, reason: 'You wrote this finding, so someone else must review it', status: 403 };
    if (isEditor) return { allowed: false, reason: 'You edited this version, so someone else must review it', status: 403 };
  }
  if (action === 'withdraw' && !isAuthor && actor.role !== 'admin') {
    return { allowed: false, reason: 'Only the author or an admin may withdraw a finding', status: 403 };
  }
  if (action === 'reopen' && !isAuthor && !isEditor && actor.role !== 'admin') {
    return { allowed: false, reason: 'Only the author, an editor or an admin may reopen a returned finding', status: 403 };
  }
  return { allowed: true, next };
}

/** Every action `actor` may take on `finding` now: what the client shows as buttons. */
export function allowedActions(finding: ReviewSubject, actor: Actor): FindingAction[] {
  return FINDING_ACTIONS.filter((a) => decide(finding, actor, a).allowed);
}
