import { describe, expect, it } from 'vitest';
import { FINDING_ACTIONS, FINDING_STATES, type FindingAction, type FindingState } from '../constants/findings';
import { ROLES, type Role } from '../constants/roles';
import { allowedActions, decide, nextState } from './review';

// The review cycle as specified for findings (our own rules): draft → in review → approved;
// in review → returned → draft; draft or returned → withdrawn.
const TRANSITIONS: [FindingState, FindingAction, FindingState][] = [
  ['draft', 'submit', 'in-review'],
  ['in-review', 'approve', 'approved'],
  ['in-review', 'return', 'returned'],
  ['returned', 'reopen', 'draft'],
  ['draft', 'withdraw', 'withdrawn'],
  ['returned', 'withdraw', 'withdrawn'],
];
const STAYS: [FindingState, FindingAction][] = [
  ['draft', 'edit'],
  ['draft', 'attach'],
  ['draft', 'comment'],
  ['in-review', 'comment'],
  ['returned', 'comment'],
  ['approved', 'revise'],
];

describe('finding review state machine', () => {
  it('moves exactly along the allowed transitions and nowhere else', () => {
    for (const state of FINDING_STATES) {
      for (const action of FINDING_ACTIONS) {
        const move = TRANSITIONS.find(([f, a]) => f === state && a === action);
        const stay = STAYS.some(([f, a]) => f === state && a === action);
        const expected = move ? move[2] : stay ? state : null;
        expect(nextState(state, action), `${state} --${action}-->`).toBe(expected);
      }
    }
  });

  it('leaves approved and withdrawn findings unchangeable (only a new version of an approved one)', () => {
    for (const action of FINDING_ACTIONS) {
      expect(nextState('withdrawn', action)).toBeNull();
      if (action !== 'revise') expect(nextState('approved', action)).toBeNull();
    }
  });
});

const AUTHOR = 1;
const EDITOR = 2;
const OTHER = 3;
const subject = (state: FindingState, extra: Partial<{ editorIds: number[]; hasNewerVersion: boolean }> = {}) => ({
  state,
  authorId: AUTHOR,
  editorIds: extra.editorIds ?? [AUTHOR, EDITOR],
  hasNewerVersion: extra.hasNewerVersion ?? false,
});

// The least role per action; the who-rules on top are tested separately below.
const LEAST: Record<FindingAction, Role> = {
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

describe('who may do what', () => {
  it('checks the least role for every action, for someone who neither wrote nor edited the finding', () => {
    for (const [from, action] of [...TRANSITIONS.map(([f, a]) => [f, a] as const), ...STAYS]) {
      for (const role of ROLES) {
        const d = decide(subject(from), { id: OTHER, role }, action);
        const roleOk = ROLES.indexOf(role) >= ROLES.indexOf(LEAST[action]);
        // Withdraw and reopen belong to the author (and editors for reopen), or an admin.
        const whoOk = action === 'withdraw' ? role === 'admin' : action === 'reopen' ? role === 'admin' : true;
        expect(d.allowed, `${role} ${action} on ${from}: ${JSON.stringify(d)}`).toBe(roleOk && whoOk);
        if (!roleOk) expect(d).toMatchObject({ status: 403 });
      }
    }
  });

  it('refuses approval and return to the author and to anyone who edited the current version (separation of duties)', () => {
    for (const action of ['approve', 'return'] as const) {
      for (const role of ['reviewer', 'admin'] as const) {
        expect(decide(subject('in-review'), { id: AUTHOR, role }, action)).toMatchObject({ allowed: false, status: 403 });
        expect(decide(subject('in-review'), { id: EDITOR, role }, action)).toMatchObject({ allowed: false, status: 403 });
        expect(decide(subject('in-review'), { id: OTHER, role }, action)).toMatchObject({ allowed: true });
      }
    }
    const d = decide(subject('in-review'), { id: AUTHOR, role: 'reviewer' }, 'approve');
    expect(!d.allowed && d.reason).toMatch(/someone else/);
  });

  it('lets the author withdraw and reopen, editors reopen, and nobody else but an admin', () => {
    expect(decide(subject('draft'), { id: AUTHOR, role: 'technician' }, 'withdraw').allowed).toBe(true);
    expect(decide(subject('draft'), { id: EDITOR, role: 'reviewer' }, 'withdraw').allowed).toBe(false);
    expect(decide(subject('returned'), { id: EDITOR, role: 'technician' }, 'reopen').allowed).toBe(true);
    expect(decide(subject('returned'), { id: OTHER, role: 'reviewer' }, 'reopen').allowed).toBe(false);
    expect(decide(subject('returned'), { id: OTHER, role: 'admin' }, 'reopen').allowed).toBe(true);
  });

  it('answers 409 for approved content and for actions that do not apply in the state', () => {
    const d = decide(subject('approved'), { id: OTHER, role: 'admin' }, 'edit');
    expect(d).toMatchObject({ allowed: false, status: 409 });
    expect(!d.allowed && d.reason).toMatch(/new version/);
    expect(decide(subject('draft'), { id: OTHER, role: 'admin' }, 'approve')).toMatchObject({ allowed: false, status: 409 });
    expect(decide(subject('approved', { hasNewerVersion: true }), { id: OTHER, role: 'admin' }, 'revise')).toMatchObject({ allowed: false, status: 409 });
    // A state conflict is reported before the role: a viewer editing approved content hears 409, not 403.
    expect(decide(subject('approved'), { id: OTHER, role: 'viewer' }, 'edit')).toMatchObject({ status: 409 });
  });

  it('lists the buttons each person sees', () => {
    expect(allowedActions(subject('draft'), { id: AUTHOR, role: 'technician' })).toEqual(['edit', 'attach', 'submit', 'comment', 'withdraw']);
    expect(allowedActions(subject('in-review'), { id: OTHER, role: 'reviewer' })).toEqual(['comment', 'return', 'approve']);
    expect(allowedActions(subject('in-review'), { id: AUTHOR, role: 'reviewer' })).toEqual(['comment']);
    expect(allowedActions(subject('approved'), { id: OTHER, role: 'viewer' })).toEqual([]);
    expect(allowedActions(subject('approved'), { id: OTHER, role: 'technician' })).toEqual(['revise']);
  });
});
