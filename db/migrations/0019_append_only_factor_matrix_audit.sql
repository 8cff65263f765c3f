-- The audit trail of the factor-correlation matrices is append-only, as the assumptions' is.
CREATE TRIGGER `factor_matrix_audit_no_update` BEFORE UPDATE ON `factor_matrix_audit` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'factor_matrix_audit is append-only: rows cannot be updated';
--> statement-breakpoint
CREATE TRIGGER `factor_matrix_audit_no_delete` BEFORE DELETE ON `factor_matrix_audit` FOR EACH ROW SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'factor_matrix_audit is append-only: rows cannot be deleted';
