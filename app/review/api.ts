// The JSON API's shape for results: per round, each player's summary (account id only for linked students).
import { classReview, sessionPlayers, type ReviewInput } from "./stats";

export const apiSessions = (input: ReviewInput) =>
  classReview(input).sessions.map((s) => ({
    id: s.id,
    title: s.title,
    startedAt: new Date(s.startedAt).toISOString(),
    live: s.live,
    answers: s.answers,
    accuracy: s.accuracy,
    players: sessionPlayers(input, s.id).map(({ key: _key, ...p }) => p),
  }));
