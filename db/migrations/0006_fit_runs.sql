CREATE TABLE `fit_runs` (
	`id` bigint AUTO_INCREMENT NOT NULL,
	`dataset_id` bigint NOT NULL,
	`dataset_sha256` varchar(64) NOT NULL,
	`request` json NOT NULL,
	`engine_version` varchar(60) NOT NULL,
	`seeds` json NOT NULL,
	`job_id` bigint,
	`created_by` int NOT NULL,
	`status` enum('queued','running','succeeded','failed','cancelled') NOT NULL DEFAULT 'queued',
	`results` json,
	`error` text,
	`created_at` datetime(3) NOT NULL DEFAULT CURRENT_TIMESTAMP(3),
	`finished_at` datetime(3),
	CONSTRAINT `fit_runs_id` PRIMARY KEY(`id`)
);
--> statement-breakpoint
ALTER TABLE `fit_runs` ADD CONSTRAINT `fit_runs_dataset_id_datasets_id_fk` FOREIGN KEY (`dataset_id`) REFERENCES `datasets`(`id`) ON DELETE restrict ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fit_runs` ADD CONSTRAINT `fit_runs_job_id_jobs_id_fk` FOREIGN KEY (`job_id`) REFERENCES `jobs`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fit_runs` ADD CONSTRAINT `fit_runs_created_by_users_id_fk` FOREIGN KEY (`created_by`) REFERENCES `users`(`id`) ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `fit_runs_dataset_idx` ON `fit_runs` (`dataset_id`);--> statement-breakpoint
CREATE INDEX `fit_runs_created_idx` ON `fit_runs` (`created_at`);--> statement-breakpoint
CREATE INDEX `fit_runs_job_idx` ON `fit_runs` (`job_id`);