import { Column, Entity, JoinColumn, ManyToOne, PrimaryColumn, PrimaryGeneratedColumn } from 'typeorm';
import { Study } from './study.entity';
import { User } from './user.entity';
import { ReportVersion } from './report-version.entity';

/** One coronary intervention of the session (part of the study's coding section). */
@Entity({ name: 'coronary_intervention' })
export class CoronaryIntervention {
  /** Chosen by the client, so a row keeps its identity across autosaves. */
  @PrimaryColumn('uuid') id!: string;
  @Column('uuid', { name: 'study_id' }) studyId!: string;
  @ManyToOne(() => Study, { onDelete: 'CASCADE' })
  @JoinColumn({ name: 'study_id' })
  study?: Study;
  @Column('smallint') position!: number;
  @Column('text') vessel!: string;
  @Column('text') kind!: string;
  @Column('boolean', { default: false }) branch!: boolean;
  @Column('text', { nullable: true }) stent!: string | null;
}

/** The code suggestions made for one signed report version (append-only). */
@Entity({ name: 'code_suggestion_set' })
export class CodeSuggestionSet {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('uuid', { name: 'report_version_id' }) reportVersionId!: string;
  @ManyToOne(() => ReportVersion, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'report_version_id' })
  reportVersion?: ReportVersion;
  @Column('uuid', { name: 'study_id' }) studyId!: string;
  @ManyToOne(() => Study, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'study_id' })
  study?: Study;
  /** The report version's number (1, then one more per addendum). */
  @Column('integer', { name: 'version_no' }) versionNo!: number;
  /** The set of the version this one supersedes, whose decided codes it is compared with. */
  @Column('uuid', { name: 'previous_set_id', nullable: true }) previousSetId!: string | null;
  /** The engine's input (null when the signed record could not be turned into one). */
  @Column('jsonb', { nullable: true }) input!: unknown;
  @Column('jsonb') warnings!: unknown;
  @Column('jsonb', { name: 'code_sets', nullable: true }) codeSets!: unknown;
  @Column('text') caution!: string;
  /** Why no suggestion could be made, when none could. */
  @Column('text', { nullable: true }) failure!: string | null;
  @Column('timestamptz', { name: 'created_at', default: () => 'now()' }) createdAt!: Date;
}

/** One code line: suggested by a rule (never changed afterwards) or added by a coder. */
@Entity({ name: 'code_line' })
export class CodeLine {
  @PrimaryGeneratedColumn('uuid') id!: string;
  @Column('uuid', { name: 'set_id' }) setId!: string;
  @ManyToOne(() => CodeSuggestionSet, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'set_id' })
  set?: CodeSuggestionSet;
  @Column('smallint') position!: number;
  @Column('text') origin!: 'suggested' | 'added';
  @Column('text') system!: string;
  @Column('text') code!: string;
  @Column('integer') units!: number;
  @Column('text', { array: true, default: () => "'{}'" }) modifiers!: string[];
  @Column('text', { name: 'rule_id', nullable: true }) ruleId!: string | null;
  @Column('text', { nullable: true }) rationale!: string | null;
  @Column('text', { nullable: true }) description!: string | null;
  @Column('boolean', { name: 'add_on', default: false }) addOn!: boolean;
  @Column('text', { name: 'code_set', nullable: true }) codeSet!: string | null;
  @Column('text', { nullable: true }) source!: string | null;
  @Column('uuid', { name: 'added_by', nullable: true }) addedBy!: string | null;
  @ManyToOne(() => User, { onDelete: 'RESTRICT', nullable: true })
  @JoinColumn({ name: 'added_by' })
  adder?: User | null;
  @Column('timestamptz', { name: 'created_at', default: () => 'now()' }) createdAt!: Date;
}

/** A coder's decision on a line (append-only; the newest per line counts). */
@Entity({ name: 'code_decision' })
export class CodeDecision {
  @PrimaryGeneratedColumn('identity', { type: 'bigint', generatedIdentity: 'ALWAYS' }) id!: string;
  @Column('uuid', { name: 'line_id' }) lineId!: string;
  @ManyToOne(() => CodeLine, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'line_id' })
  line?: CodeLine;
  @Column('text') decision!: 'accept' | 'edit' | 'reject' | 'add';
  @Column('text', { nullable: true }) code!: string | null;
  @Column('integer', { nullable: true }) units!: number | null;
  @Column('text', { array: true, nullable: true }) modifiers!: string[] | null;
  @Column('text', { nullable: true }) reason!: string | null;
  @Column('uuid', { name: 'decided_by' }) decidedBy!: string;
  @ManyToOne(() => User, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'decided_by' })
  decider?: User;
  @Column('text', { name: 'decider_name' }) deciderName!: string;
  @Column('timestamptz', { name: 'decided_at', default: () => 'now()' }) decidedAt!: Date;
}

/** A study's place in the coding queue: to-code → in-review → coded; an addendum queues it again. */
@Entity({ name: 'coding_review' })
export class CodingReview {
  @PrimaryColumn('uuid', { name: 'study_id' }) studyId!: string;
  @ManyToOne(() => Study, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'study_id' })
  study?: Study;
  @Column('text') status!: 'to-code' | 'in-review' | 'coded';
  @Column('uuid', { name: 'current_set_id' }) currentSetId!: string;
  @ManyToOne(() => CodeSuggestionSet, { onDelete: 'RESTRICT' })
  @JoinColumn({ name: 'current_set_id' })
  currentSet?: CodeSuggestionSet;
  /** When the set in force was made: the queue's order and the age it shows. */
  @Column('timestamptz', { name: 'queued_at' }) queuedAt!: Date;
  @Column('uuid', { name: 'completed_by', nullable: true }) completedBy!: string | null;
  @Column('text', { name: 'completer_name', nullable: true }) completerName!: string | null;
  @Column('timestamptz', { name: 'completed_at', nullable: true }) completedAt!: Date | null;
  @Column('timestamptz', { name: 'updated_at', default: () => 'now()' }) updatedAt!: Date;
}
