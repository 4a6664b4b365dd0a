import { AssistCrane } from './AssistCrane.js';
import { Component } from './Component.js';
import { CraneModel } from './CraneModel.js';
import { CraneUnit } from './CraneUnit.js';
import { Inspection } from './Inspection.js';
import { Job } from './Job.js';
import { JobBoard } from './JobBoard.js';
import { JobCrew } from './JobCrew.js';
import { JobEvent } from './JobEvent.js';
import { JobOverride } from './JobOverride.js';
import { JobPlan } from './JobPlan.js';
import { MailOutbox } from './MailOutbox.js';
import { RefreshToken } from './RefreshToken.js';
import { SignInAudit } from './SignInAudit.js';
import { SignInLink } from './SignInLink.js';
import { Upload } from './Upload.js';
import { User } from './User.js';

/** Every entity the data source knows; migrations create their tables. */
export const entities = [User, RefreshToken, SignInLink, SignInAudit, Upload, CraneModel, CraneUnit, AssistCrane, Component, Inspection, Job, JobBoard, JobCrew, JobEvent, JobOverride, JobPlan, MailOutbox];
export { AssistCrane, Component, CraneModel, CraneUnit, Inspection, Job, JobBoard, JobCrew, JobEvent, JobOverride, JobPlan, MailOutbox, RefreshToken, SignInAudit, SignInLink, Upload, User };
