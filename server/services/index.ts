import type { Database } from "../db";
import type { Mailer } from "../mail/mailer";
import { createInvitationService } from "./invitations";
import { createOutboxService } from "./outbox";
import { createStudyService } from "./studies";
import { createUserService } from "./users";

export function createServices(db: Database, mailer: Mailer, appUrl: string) {
  return {
    users: createUserService(db),
    studies: createStudyService(db),
    invitations: createInvitationService(db, mailer, appUrl),
    outbox: createOutboxService(db),
  };
}
export type Services = ReturnType<typeof createServices>;
