import crypto from 'node:crypto';
import { canonicalJson, differences } from '../../../shared/findings/canonical';
import type { SignatureMeaning } from '../../../shared/constants/findings';

/** One piece of evidence as it enters the signed content. */
export interface SignedEvidence {
  position: number;
  savedViewId: number | null;
  title: string;
  kind: string;
  snapshot: Record<string, unknown>;
  svg: string | null;
}

/**
 * What a reviewer's signature covers: the finding's content and every evidence snapshot, and the
 * signature's own who/when/meaning (so none of those can be changed without the hash changing).
 * Built the same way from the finding's rows and from the wiki page's rows, so either can be checked.
 * Id lists are sorted: their order carries no meaning.
 */
export interface SignedContent {
  finding: {
    id: number;
    seriesId: number;
    version: number;
    authorId: number;
    title: string;
    bodyMd: string;
    trialIds: number[];
    speciesIds: number[];
    resinIds: number[];
  };
  evidence: SignedEvidence[];
  signature: { signerId: number; signerName: string; meaning: SignatureMeaning; signedAt: string };
}

const sorted = (ids: number[]) => [...ids].sort((a, b) => a - b);

export function signedContent(c: SignedContent): SignedContent {
  return {
    finding: { ...c.finding, trialIds: sorted(c.finding.trialIds), speciesIds: sorted(c.finding.speciesIds), resinIds: sorted(c.finding.resinIds) },
    evidence: [...c.evidence].sort((a, b) => a.position - b.position),
    signature: c.signature,
  };
}

export function sha256Hex(text: string): string {
  return crypto.createHash('sha256').update(text, 'utf8').digest('hex');
}

/** The canonical text and its SHA-256. */
export function hashContent(content: SignedContent): { canonical: string; hash: string } {
  const canonical = canonicalJson(signedContent(content));
  return { canonical, hash: sha256Hex(canonical) };
}

/** Where `actual` differs from what was signed, each path prefixed with where it was read. */
export function whatDiffers(signedCanonical: string, actual: SignedContent, source: string): string[] {
  let signed: unknown;
  try {
    signed = JSON.parse(signedCanonical);
  } catch {
    return [`${source}: the signed record cannot be read`];
  }
  return differences(signed, JSON.parse(canonicalJson(signedContent(actual)))).map((p) => `${source}: ${p}`);
}
