import { CreateUsers1764633600000 } from './1764633600000-CreateUsers.js';
import { CreateSessions1764637200000 } from './1764637200000-CreateSessions.js';
import { CreateFleet1764640800000 } from './1764640800000-CreateFleet.js';
import { CreateJobs1764644400000 } from './1764644400000-CreateJobs.js';
import { CreatePlans1764648000000 } from './1764648000000-CreatePlans.js';
import { AddBoardState1764651600000 } from './1764651600000-AddBoardState.js';
import { ArrangementDataV21764655200000 } from './1764655200000-ArrangementDataV2.js';
import { JobEnding1764662400000 } from './1764662400000-JobEnding.js';
import { MailOutbox1764666000000 } from './1764666000000-MailOutbox.js';
import { JobTimeZone1764669600000 } from './1764669600000-JobTimeZone.js';
import { FleetIdentityNoCase1764673800000 } from './1764673800000-FleetIdentityNoCase.js';
import { BoardSnapshots1764677400000 } from './1764677400000-BoardSnapshots.js';
import { UserUnits1764681000000 } from './1764681000000-UserUnits.js';

/** The migration chain, oldest first. */
export const migrations = [CreateUsers1764633600000, CreateSessions1764637200000, CreateFleet1764640800000, CreateJobs1764644400000, CreatePlans1764648000000, AddBoardState1764651600000, ArrangementDataV21764655200000, JobEnding1764662400000, MailOutbox1764666000000, JobTimeZone1764669600000, FleetIdentityNoCase1764673800000, BoardSnapshots1764677400000, UserUnits1764681000000];
