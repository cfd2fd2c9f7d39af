/**
 * Every screen after the first: one chunk of the web build, loaded once when the first of them opens
 * (or in the background after the first screen has shown; see components/later-screens.tsx). The
 * route files under app/ name their screen here. Kept together on purpose: the web build puts any
 * module that two route chunks share into a chunk every page loads, so the forms' libraries (schema
 * validation, form state, the physiology and coding rules) would otherwise ride in the first load.
 */
import admin from './admin';
import audit from './audit';
import caughtMail from './caught-mail';
import deliveries from './deliveries';
import turnaround from './turnaround';
import codingQueue from './coding-queue';
import codingReview from './coding-review';
import newStudy from './new-study';
import studyLayout from './study/layout';
import studyOverview from './study/overview';
import studySetup from './study/setup';
import studyVessels from './study/vessels';
import studyVasoreactivity from './study/vasoreactivity';
import studyFindings from './study/findings';
import studyAttachments from './study/attachments';
import studyReport from './study/report';
import studyCoding from './study/coding';

export const screens = {
  admin,
  audit,
  caughtMail,
  deliveries,
  turnaround,
  codingQueue,
  codingReview,
  newStudy,
  studyLayout,
  studyOverview,
  studySetup,
  studyVessels,
  studyVasoreactivity,
  studyFindings,
  studyAttachments,
  studyReport,
  studyCoding,
};
