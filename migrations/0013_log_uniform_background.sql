-- questions.log_uniform_background: a calibration question whose information Cooke's
-- classical model scores against the log-uniform background instead of
-- the uniform (elicit.ModelOptions.LogScale), for a quantity spread over
-- orders of magnitude. 0 for every question made before this version.
-- Set on the calibration page, with a reason, as a calibration_background_set
-- event.
ALTER TABLE questions ADD COLUMN log_uniform_background INTEGER NOT NULL DEFAULT 0 CHECK (log_uniform_background IN (0, 1));
