/** Shapes of the Gloss JSON API as the web app uses them. Extra fields from the server are kept. */
export type Role = 'owner' | 'lead' | 'coder' | 'trainee' | 'observer';
export const ROLES: Role[] = ['owner', 'lead', 'coder', 'trainee', 'observer'];

export interface Me {
  id: string;
  email: string;
  name: string;
}

export interface StudySummary {
  id: string;
  title: string;
  role?: Role;
  [key: string]: unknown;
}

export interface Study extends StudySummary {
  /** Room of the study's codebook document. */
  codebookRoom: string;
  /** Room of the study's memos document. */
  memosRoom: string;
  /** Which memos entries this person receives (changes with it): the offline copy is kept per view. */
  memosView?: string;
  /** Independent coding or reflexive mode etc., as the server reports it. */
  mode?: string;
  /** The date after which the study's data should be deleted (ISO), when one is set. */
  retentionUntil?: string | null;
  /** Actions the caller's role allows in this study (the server's role table). */
  permissions?: string[];
}

export interface Member {
  userId: string;
  name: string;
  email: string;
  role: Role;
}

export interface TextSummary {
  id: string;
  title: string;
  room: string;
  /** Segments per coder, when the server reports them. */
  progress?: Array<{ coderId: string; name?: string; segments: number }>;
}

export interface LayerInfo {
  room: string;
  coderId: string;
  name?: string;
  mine?: boolean;
  canWrite?: boolean;
  /** The calibration round the layer belongs to (null: coding outside any round). */
  round?: string | null;
  /** A coder's own layer, or a text's consensus layer (written by the lead and owner). */
  kind?: 'coder' | 'consensus';
}

export interface TextDetail {
  id: string;
  title: string;
  room: string;
  layers: LayerInfo[];
  /** The open calibration round the text is in, as the reader stands in it (absent: none). */
  round?: { id: string; phase: string; participant: boolean } | undefined;
}
