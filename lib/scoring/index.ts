export { invalidateEmbed, invalidateWorkspace, loadServedEmbed, loadServedVersion, isServing, parseValues, clearScoringCaches, TOKEN_SHAPE, type ServedEmbed, type ServedVersion, type FieldValue } from './served';
export { scoreForToken, scoreCallFrom, scoreTokenParam, scoreBodySchema, corsHeaders, checkCaller, ownOrigins, MAX_SCORE_BODY_BYTES, type ScoreAnswer, type ScoreCall } from './score';
export { answerState, invalidateAllowance } from './allowance';
export { recentScoringAlerts, type ScoringAlert } from './alerts';
export { scoringSettings, rereadScoringSettings, reportLimit } from './limits';
