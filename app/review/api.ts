// The JSON API's shape for results: per round, each player's summary (account id only for linked students).
import { classReview, roundPlayers, type ReviewInput } from "./stats";

export const apiRounds = (input: ReviewInput) =>
  classReview(input).rounds.map((s) => ({
    id: s.id,
    title: s.title,
    startedAt: new Date(s.startedAt).toISOString(),
    live: s.live,
    answers: s.answers,
    accuracy: s.accuracy,
    players: roundPlayers(input, s.id).map(({ key: _key, ...p }) => p),
  }));
