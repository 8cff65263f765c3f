CREATE TABLE `evidence_backtests` (
	`id` int AUTO_INCREMENT NOT NULL,
	`version_id` int NOT NULL,
	`dataset_id` bigint NOT NULL,
	`periods` json NOT NULL,
	`status` enum('queued','done','failed') NOT NULL DEFAULT 'queued',
	`result` json,
	`error` text,
	`engine_version` varchar(60),
	`job_id` bigint,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`finished_at` datetime(3),
	CONSTRAINT `evidence_backtests_id` PRIMARY KEY(`id`),
	CONSTRAINT `evidence_backtests_uq` UNIQUE(`version_id`,`dataset_id`)
);
--> statement-breakpoint
CREATE TABLE `overdue_policy_changes` (
	`id` int AUTO_INCREMENT NOT NULL,
	`policy` enum('flag','withdraw') NOT NULL,
	`changed_by` int NOT NULL,
	`reason` text NOT NULL,
	`at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	CONSTRAINT `overdue_policy_changes_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `evidence_backtests` ADD CONSTRAINT `evidence_backtests_version_id_assumption_versions_id_fk` FOREIGN KEY (`version_id`) REFERENCES `assumption_versions`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `evidence_backtests` ADD CONSTRAINT `evidence_backtests_dataset_id_datasets_id_fk` FOREIGN KEY (`dataset_id`) REFERENCES `datasets`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `overdue_policy_changes` ADD CONSTRAINT `overdue_policy_changes_changed_by_users_id_fk` FOREIGN KEY (`changed_by`) REFERENCES `users`(`id`) ON DELETE restrict ON UPDATE no action;