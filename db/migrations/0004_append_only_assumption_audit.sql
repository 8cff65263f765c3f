-- The assumption audit trail is append-only: no UPDATE or DELETE, by anyone, enforced in the database.
CREATE TRIGGER `assumption_audit_no_update` BEFORE UPDATE ON `assumption_audit` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'assumption_audit is append-only: rows cannot be updated';
--> statement-breakpoint
CREATE TRIGGER `assumption_audit_no_delete` BEFORE DELETE ON `assumption_audit` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'assumption_audit is append-only: rows cannot be deleted';
