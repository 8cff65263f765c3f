-- The admin audit log is append-only: no UPDATE or DELETE, by anyone, enforced in the database.
CREATE TRIGGER `admin_audit_no_update` BEFORE UPDATE ON `admin_audit` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'admin_audit is append-only: rows cannot be updated';
--> statement-breakpoint
CREATE TRIGGER `admin_audit_no_delete` BEFORE DELETE ON `admin_audit` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'admin_audit is append-only: rows cannot be deleted';
