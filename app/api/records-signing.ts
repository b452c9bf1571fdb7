export * from '../signing/keys';
