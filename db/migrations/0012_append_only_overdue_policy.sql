-- The overdue policy's history is append-only: an as-of answer of the consumer API reads the policy in force at that time.
CREATE TRIGGER `overdue_policy_changes_no_update` BEFORE UPDATE ON `overdue_policy_changes` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'overdue_policy_changes is append-only: rows cannot be updated';
--> statement-breakpoint
CREATE TRIGGER `overdue_policy_changes_no_delete` BEFORE DELETE ON `overdue_policy_changes` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'overdue_policy_changes is append-only: rows cannot be deleted';
