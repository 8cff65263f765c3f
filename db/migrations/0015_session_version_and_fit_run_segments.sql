CREATE TABLE `fit_run_segments` (
	`fit_run_id` bigint NOT NULL,
	`position` int NOT NULL,
	`segment` varchar(200) NOT NULL,
	`job_id` bigint,
	`outcome` json,
	`finished_at` datetime(3),
	CONSTRAINT `fit_run_segments_fit_run_id_position_pk` PRIMARY KEY(`fit_run_id`,`position`)
);
--> statement-breakpoint
ALTER TABLE `users` ADD `session_version` int DEFAULT 0 NOT NULL;--> statement-breakpoint
ALTER TABLE `fit_run_segments` ADD CONSTRAINT `fit_run_segments_fit_run_id_fit_runs_id_fk` FOREIGN KEY (`fit_run_id`) REFERENCES `fit_runs`(`id`) ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE `fit_run_segments` ADD CONSTRAINT `fit_run_segments_job_id_jobs_id_fk` FOREIGN KEY (`job_id`) REFERENCES `jobs`(`id`) ON DELETE set null ON UPDATE no action;--> statement-breakpoint
CREATE INDEX `fit_run_segments_job_idx` ON `fit_run_segments` (`job_id`);