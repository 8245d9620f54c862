/** The located JSON parser lives in data/ (data cannot import spec/); spec code keeps importing it from here. */
export * from '../data/jsonText';
