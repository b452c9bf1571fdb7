export * from '../../db/queries/check-write';
