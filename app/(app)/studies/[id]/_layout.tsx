import { laterScreen } from '../../../../components/later-screens';

/** A study's frame (header, section tabs, the form's state): the screen is in components/screens, the chunk of every screen after the first. */
export default laterScreen('studyLayout');
