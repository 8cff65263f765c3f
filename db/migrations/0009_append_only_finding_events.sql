-- A finding's history is append-only: no UPDATE or DELETE, by anyone, enforced in the database.
CREATE TRIGGER `finding_events_no_update` BEFORE UPDATE ON `finding_events` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'finding_events is append-only: rows cannot be updated';
--> statement-breakpoint
CREATE TRIGGER `finding_events_no_delete` BEFORE DELETE ON `finding_events` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'finding_events is append-only: rows cannot be deleted';
