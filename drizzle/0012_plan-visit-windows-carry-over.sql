-- Carry existing plan visit templates over to windows: a rule's BYMONTH months become the season
-- (from the first month after a gap to the last month before it; all year without BYMONTH), its
-- FREQ and INTERVAL stay as the rhythm (FREQ=YEARLY = once in the season), tolerance 0.
-- The same reading as legacyRuleToVisitSchedule() in shared/schemas/visit-schedule.ts.
WITH parsed AS (
  SELECT id,
    substring(upper(rrule) from 'FREQ=([A-Z]+)') AS freq,
    least(52, greatest(1, coalesce(substring(upper(rrule) from 'INTERVAL=([0-9]+)')::int, 1))) AS step,
    coalesce((SELECT array_agg(DISTINCT m::int) FROM unnest(string_to_array(substring(upper(rrule) from 'BYMONTH=([0-9,]+)'), ',')) AS m WHERE m <> '' AND m::int BETWEEN 1 AND 12), '{}'::int[]) AS months
  FROM plan_visit_templates
  WHERE regexp_replace(upper(rrule), '(^|;)(FREQ|INTERVAL)=[^;]*', '', 'g') <> ''
),
bounds AS (
  SELECT id, freq, step, months,
    (SELECT min(m) FROM unnest(months) AS m WHERE NOT (((m + 10) % 12 + 1) = ANY (months))) AS first_month
  FROM parsed
),
seasons AS (
  SELECT id, freq, step, first_month,
    coalesce(
      (SELECT max(m) FROM unnest(months) AS m WHERE NOT ((m % 12 + 1) = ANY (months)) AND m < first_month),
      (SELECT max(m) FROM unnest(months) AS m WHERE NOT ((m % 12 + 1) = ANY (months)))
    ) AS last_month
  FROM bounds
)
UPDATE plan_visit_templates AS t SET
  rrule = CASE WHEN s.freq = 'YEARLY' OR s.freq IS NULL THEN 'FREQ=YEARLY'
    ELSE 'FREQ=' || s.freq || CASE WHEN s.step > 1 THEN ';INTERVAL=' || s.step ELSE '' END END,
  season_from = CASE WHEN s.first_month IS NULL THEN '01-01' ELSE lpad(s.first_month::text, 2, '0') || '-01' END,
  season_to = CASE WHEN s.first_month IS NULL THEN '12-31'
    ELSE to_char(make_date(2000, s.last_month, 1) + interval '1 month' - interval '1 day', 'MM-DD') END,
  tolerance_days = 0
FROM seasons AS s
WHERE t.id = s.id;
